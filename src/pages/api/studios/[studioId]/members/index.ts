// GET /api/studios/:studioId/members → the members table (artist or above).
import { endpoint, json, idParam } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { listMembers } from '~/lib/server/members';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  return json({ members: await listMembers(access.studioId), you: { userId: access.userId, role: access.role } });
});
