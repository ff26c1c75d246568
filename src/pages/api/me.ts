// GET /api/me → the signed-in user and the studios they belong to.
import { endpoint, json } from '~/lib/server/http';
import { requireUser, studiosOf } from '~/lib/server/authz';

export const GET = endpoint(async ({ locals }) => {
  const user = requireUser(locals);
  return json({ user: { id: user.id, email: user.email, name: user.name }, studios: await studiosOf(user.id, user.memberships) });
});
