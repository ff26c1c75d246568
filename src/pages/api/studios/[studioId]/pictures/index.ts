// GET /api/studios/:studioId/pictures → {pictures: [{id, fileName, contentType, width, height, byteSize, sha256, url}]}:
// the studio's ready prop pictures with short-lived URLs (artist).
// POST /api/studios/:studioId/pictures {fileName, contentType: image/png|image/webp, byteSize} → 201 {assetId, upload}:
// starts a prop picture upload to a presigned form; 413 for an oversize declaration (artist).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { listPictures, startPictureUpload } from '~/lib/server/prop-pictures';
import { pictureUploadBody } from '~/lib/library/schemas';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  return json(await listPictures(access));
});

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  const body = await readJson(request, pictureUploadBody);
  return json(await startPictureUpload(access, body), 201);
});
