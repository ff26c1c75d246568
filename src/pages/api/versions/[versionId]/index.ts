// GET /api/versions/:versionId → {version} with its scene (a client sees only versions shared with clients).
import { endpoint, json, idParam } from '~/lib/server/http';
import { versionFor, versionView } from '~/lib/server/versions';

export const GET = endpoint(async ({ params, locals }) => {
  const { version } = await versionFor(locals, idParam(params, 'versionId'), 'client');
  return json({ version: versionView(version) });
});
