// GET /api/studios/:studioId/shots/:shotId → {shot} with plate, thumbnail and versions (any member; clients: shared only)
// PATCH {any shot field} → {shot}: partial edit (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { getShot, updateShot } from '~/lib/server/library';
import { shotPatch } from '~/lib/library/schemas';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  return json({ shot: await getShot(access, idParam(params, 'shotId')) });
});

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, shotPatch);
  return json({ shot: await updateShot(access, idParam(params, 'shotId'), body) });
});
