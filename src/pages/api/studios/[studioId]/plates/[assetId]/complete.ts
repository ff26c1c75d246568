// POST /api/studios/:studioId/plates/:assetId/complete {width?, height?, durationSeconds?} (video: as the browser
// measured) → {asset}: checks the uploaded file's real size, type and dimensions and makes it the shot's current
// plate or thumbnail; 422 (file deleted) when the content is not what was declared (artist).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { completePlateUpload } from '~/lib/server/plates';
import { plateCompleteBody } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  const body = await readJson(request, plateCompleteBody);
  return json(await completePlateUpload(access, idParam(params, 'assetId'), body));
});
