// POST /api/shots/:shotId/versions {scene, comment?} → 201 {version}: saves the scene as the shot's next version (artist+).
// GET → {versions} (newest first; a client sees only shared ones, without scenes; 404 when none).
import { z } from 'zod';
import { asSeenBy, shotAccess } from '~/lib/server/access';
import { endpoint, json, idParam, readJson, HttpError } from '~/lib/server/http';
import { createVersion, validScene, versionsOfShot, versionView } from '~/lib/server/versions';

const Body = z.object({
  scene: z.unknown().refine((s) => s !== undefined, 'is required'),
  comment: z.string().trim().max(2000, 'is too long (2000 characters at most)').optional(),
});

export const POST = endpoint(async ({ params, locals, request }) => {
  const { shot, access } = await shotAccess(locals, idParam(params, 'shotId'), 'artist');
  const body = await readJson(request, Body, 5_000_000);
  const scene = validScene(body.scene);
  const version = await createVersion(shot, access.userId, scene, body.comment || null);
  return json({ version }, 201);
});

export const GET = endpoint(async ({ params, locals }) => {
  const { shot, access } = await shotAccess(locals, idParam(params, 'shotId'), 'client');
  const visible = await versionsOfShot(access, shot.id);
  // A shot with nothing shared is not confirmed to a client (the same 404 as a shot that does not exist).
  if (access.role === 'client' && visible.length === 0) throw new HttpError('not_found', 'No such shot');
  return json({ versions: visible.map((v) => asSeenBy(access, versionView(v, false))) });
});
