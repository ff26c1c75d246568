// POST /api/studios/:studioId/shows/:showId/archive {archived: boolean} → {show}: archive or bring back a show (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { setShowArchived } from '~/lib/server/library';
import { archiveBody } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, archiveBody);
  return json({ show: await setShowArchived(access, idParam(params, 'showId'), body.archived) });
});
