// DELETE /api/studios/:studioId/invitations/:invitationId: withdraw an open invitation (owner).
import { endpoint, json, idParam } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { revokeInvitation } from '~/lib/server/members';

export const DELETE = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  await revokeInvitation(access.studioId, idParam(params, 'invitationId'), access.userId);
  return json(null, 204);
});
