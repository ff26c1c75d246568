// POST /api/auth/sign-out → 204; ends this session and clears its cookie.
import { endpoint, json } from '~/lib/server/http';
import { lucia } from '~/lib/server/auth';

export const POST = endpoint(async ({ locals, cookies }) => {
  if (locals.session) await lucia().invalidateSession(locals.session.id);
  const c = lucia().createBlankSessionCookie();
  cookies.set(c.name, c.value, c.attributes);
  return json(null, 204);
});
