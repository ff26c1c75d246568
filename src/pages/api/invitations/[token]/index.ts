// GET /api/invitations/:token → what the invitation offers (public: the token is the credential).
import { endpoint, json } from '~/lib/server/http';
import { openInvitation } from '~/lib/server/members';

export const GET = endpoint(async ({ params }) => {
  const inv = await openInvitation(params.token ?? '');
  return json({ studio: inv.studioName, email: inv.email, role: inv.role, expiresAt: inv.expiresAt, accountExists: inv.accountExists });
});
