// POST /api/invitations/:token/accept {name?, password?} → 200 {studio}; joins the studio (creating the account if new) and signs in.
import { z } from 'zod';
import { endpoint, json, readJson, PUBLIC_FORM_BYTES } from '~/lib/server/http';
import { personName, password } from '~/lib/forms/fields';
import { acceptInvitation } from '~/lib/server/members';
import { lucia } from '~/lib/server/auth';

const Body = z.object({ name: personName.optional(), password: password.optional() });

export const POST = endpoint(async ({ params, request, locals, cookies }) => {
  const body = await readJson(request, Body, PUBLIC_FORM_BYTES);
  const result = await acceptInvitation(params.token ?? '', locals.user?.id ?? null, body);
  if (!locals.user) {
    const session = await lucia().createSession(result.userId, {});
    const c = lucia().createSessionCookie(session.id);
    cookies.set(c.name, c.value, c.attributes);
  }
  return json({ studio: result.studioSlug });
});
