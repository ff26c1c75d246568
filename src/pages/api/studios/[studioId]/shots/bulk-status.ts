// POST /api/studios/:studioId/shots/bulk-status {ids: number[], status} → {updated, status, ids}: one transaction,
// every shot in this studio or nothing changes (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { bulkSetStatus } from '~/lib/server/library';
import { bulkStatusBody } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, bulkStatusBody);
  return json(await bulkSetStatus(access, body.ids, body.status));
});
