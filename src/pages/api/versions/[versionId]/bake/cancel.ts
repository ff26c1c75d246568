// POST /api/versions/:versionId/bake/cancel → {state:'cancelled'|'cancelling'} (artist+); 409 when nothing is baking.
import { endpoint, json, idParam, readEmptyBody } from '~/lib/server/http';
import { versionAccess } from '~/lib/server/access';
import { cancelBake } from '~/lib/bake/queue';

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'artist');
  await readEmptyBody(request);
  return json({ state: await cancelBake(version.id, access.studioId, access.userId) });
});
