// GET /api/studios/:studioId/compare?a=<versionId>&b=<versionId> → {shot, a, b, changes, counts}: two versions of the
// same shot with their scenes and the table of what changed from a to b (any member who may see both versions).
import { z } from 'zod';
import { endpoint, json, idParam, readQuery } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { compareVersions } from '~/lib/server/review';

const versionId = z.string({ required_error: 'is required' }).regex(/^[1-9][0-9]{0,15}$/, 'must be a version id').transform(Number);
const Query = z.object({ a: versionId, b: versionId }).strict();

export const GET = endpoint(async ({ params, locals, url }) => {
  const studioId = idParam(params, 'studioId');
  const access = await requireRole(locals, studioId, 'client');
  const q = readQuery(url, Query);
  return json(await compareVersions(access, q.a, q.b));
});
