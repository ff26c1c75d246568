// GET /api/studios/:studioId/shows/:showId → {show} with shot counts by status (any member; clients: shared shows only)
// PATCH {code?, name?, description?, frameRate?} → {show} (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { getShow, updateShow } from '~/lib/server/library';
import { showPatch } from '~/lib/library/schemas';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  return json({ show: await getShow(access, idParam(params, 'showId')) });
});

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, showPatch);
  return json({ show: await updateShow(access, idParam(params, 'showId'), body) });
});
