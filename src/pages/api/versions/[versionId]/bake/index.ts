// POST /api/versions/:versionId/bake → 202 {state:'queued'} | 200 {state:'baked'|'reused'|'running'} (artist+).
// GET → {bake: progress|null, bakeState}: frames done of total, percent, ETA in seconds, error.
import { endpoint, json, idParam } from '~/lib/server/http';
import { versionAccess } from '~/lib/server/access';
import { bakeProgress, enqueueBake } from '~/lib/bake/queue';

export const POST = endpoint(async ({ params, locals }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'artist');
  const result = await enqueueBake(version.id, access.studioId, access.userId);
  return json({ state: result.kind, jobId: result.jobId }, result.kind === 'queued' ? 202 : 200);
});

export const GET = endpoint(async ({ params, locals }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'artist');
  const [progress, fresh] = await Promise.all([bakeProgress(version.id, access.studioId), versionAccess(locals, version.id, 'artist')]);
  return json({ bakeState: fresh.version.bakeState, bake: progress });
});
