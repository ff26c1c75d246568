// POST /api/studios/:studioId/shots/:shotId/archive {archived: boolean} → {shot}: archive or bring back a shot (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { setShotArchived } from '~/lib/server/library';
import { archiveBody } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, archiveBody);
  return json({ shot: await setShotArchived(access, idParam(params, 'shotId'), body.archived) });
});
