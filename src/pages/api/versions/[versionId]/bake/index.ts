// POST /api/versions/:versionId/bake → 202 {state:'queued'} | 200 {state:'baked'|'reused'|'running'} (artist+).
// GET → {bake: progress|null, bakeState}: frames done of total, percent, ETA in seconds, error.
import { eq } from 'drizzle-orm';
import { db } from '~/lib/server/db';
import { versions } from '~/lib/server/db/schema';
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
  // The state is read again (not the row loaded above), and before the progress: the bake's end commits both in one
  // transaction, so a 'baked' read first means the progress read after it sees the finished job. (Read in parallel,
  // on two connections, 'baked' could come with the progress of a moment before: 0 % on a short bake.)
  const [fresh] = await db().select({ bakeState: versions.bakeState }).from(versions).where(eq(versions.id, version.id));
  const progress = await bakeProgress(version.id, access.studioId);
  return json({ bakeState: fresh?.bakeState ?? version.bakeState, bake: progress });
});
