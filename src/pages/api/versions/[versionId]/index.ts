// GET /api/versions/:versionId → {version} with its scene (a client sees only versions shared with clients).
import { endpoint, json, idParam } from '~/lib/server/http';
import { asSeenBy, versionAccess } from '~/lib/server/access';
import { versionView } from '~/lib/server/versions';

export const GET = endpoint(async ({ params, locals }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'client');
  return json({ version: asSeenBy(access, versionView(version)) });
});
