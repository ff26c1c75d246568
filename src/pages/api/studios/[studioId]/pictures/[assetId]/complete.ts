// POST /api/studios/:studioId/pictures/:assetId/complete → {picture}: checks the uploaded file's real size, type,
// alpha channel and dimensions and makes the prop picture ready; 422 (file deleted) naming `file` when it is not a
// PNG or WebP with alpha within the limits, 413 naming `byteSize` when larger (artist).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { completePictureUpload } from '~/lib/server/prop-pictures';
import { z } from 'zod';

const body = z.object({}).strict('unknown field');

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  await readJson(request, body); // nothing to send: an empty body or {}
  return json(await completePictureUpload(access, idParam(params, 'assetId')));
});
