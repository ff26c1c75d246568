// POST /api/studios/:studioId/shots/:shotId/plates {fileName, contentType, byteSize, kind?: 'plate'|'thumbnail'}
// → 201 {assetId, kind, upload: {url, method, headers, expiresInSeconds}}; 413 for an oversize declaration (artist).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { startPlateUpload } from '~/lib/server/plates';
import { plateUploadBody } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  const body = await readJson(request, plateUploadBody);
  return json(await startPlateUpload(access, idParam(params, 'shotId'), body), 201);
});
