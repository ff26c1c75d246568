// GET /api/studios/:studioId/settings → the studio's settings (any member); PATCH {handleConvention} (owner only):
// where the first frame number falls — the first head-handle frame or the cut in. Imports from then on follow it.
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { handleConventionOf, setHandleConvention } from '~/lib/server/library';
import { studioSettingsPatch } from '~/lib/library/schemas';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  return json({ settings: { handleConvention: await handleConventionOf(access.studioId) } });
});

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  const body = await readJson(request, studioSettingsPatch);
  return json({ settings: await setHandleConvention(access, body.handleConvention) });
});
