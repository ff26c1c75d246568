// GET /api/studios/:studioId/inbox → {counts, toReview, returned, newNotes}: what waits for the signed-in member.
// Supervisors and owners: submitted versions; artists and above: their returned versions and new notes on their
// versions; clients: submitted versions shared with them.
import { endpoint, json, idParam } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { inboxFor } from '~/lib/server/review';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  return json(await inboxFor(access));
});
