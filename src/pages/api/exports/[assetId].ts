// GET /api/exports/:assetId → {export}: one stored export with a fresh download link (artist of its studio).
import { endpoint, json, idParam } from '~/lib/server/http';
import { requireRole, requireUser } from '~/lib/server/authz';
import { exportFor, exportStudio } from '~/lib/server/exports';

export const GET = endpoint(async ({ params, locals }) => {
  requireUser(locals);
  const assetId = idParam(params, 'assetId');
  const access = await requireRole(locals, await exportStudio(assetId), 'artist');
  return json({ export: await exportFor(access.studioId, assetId) });
});
