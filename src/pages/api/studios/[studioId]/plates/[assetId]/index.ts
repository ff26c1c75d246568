// GET /api/studios/:studioId/plates/:assetId → {asset, url, expiresInSeconds}: a short-lived URL to view a plate or
// thumbnail (any member; clients: plates of shared shows only).
import { endpoint, json, idParam } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { plateViewUrl } from '~/lib/server/plates';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  return json(await plateViewUrl(access, idParam(params, 'assetId')));
});
