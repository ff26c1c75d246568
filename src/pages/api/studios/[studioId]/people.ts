// GET /api/studios/:studioId/people → {people: [{userId, name, role}]}: who can be assigned shots (artist).
import { endpoint, json, idParam } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { listAssignablePeople } from '~/lib/server/library';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  return json({ people: await listAssignablePeople(access.studioId) });
});
