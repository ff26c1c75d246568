// POST /api/studios/:studioId/shots/:shotId/scale {pixels, metres} → {shotId, metresPerPixel, plateAssetId}:
// the plate's scale from a line drawn over something of known size (artist).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { setShotScale } from '~/lib/server/plates';
import { scaleBody } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  const body = await readJson(request, scaleBody);
  return json({ scale: await setShotScale(access, idParam(params, 'shotId'), body) });
});
