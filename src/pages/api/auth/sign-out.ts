// POST /api/auth/sign-out → 204; ends this session and clears its cookie.
import { endpoint, json, readBodyText } from '~/lib/server/http';
import { lucia } from '~/lib/server/auth';

export const POST = endpoint(async ({ locals, cookies, request }) => {
  await readBodyText(request, 4096); // no body is needed; an oversized one is refused like on every other route
  if (locals.session) await lucia().invalidateSession(locals.session.id);
  const c = lucia().createBlankSessionCookie();
  cookies.set(c.name, c.value, c.attributes);
  return json(null, 204);
});
