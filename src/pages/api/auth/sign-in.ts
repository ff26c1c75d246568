// POST /api/auth/sign-in {email, password} → 200 {user}; sets the session cookie. Throttled per account and per
// address (src/lib/server/throttle.ts): the attempt is recorded before the password is checked; past the limit 429.
import { z } from 'zod';
import { eq } from 'drizzle-orm';
import { endpoint, json, readJson, HttpError, PUBLIC_FORM_BYTES } from '~/lib/server/http';
import { lucia } from '~/lib/server/auth';
import { db } from '~/lib/server/db';
import { users } from '~/lib/server/db/schema';
import { verifyPassword, hashPassword } from '~/lib/server/password';
import { email } from '~/lib/forms/fields';
import { clientAddressOf } from '~/lib/server/client-address';
import { RULES, forgive, recordAttempt, throttled } from '~/lib/server/throttle';

const Body = z.object({ email, password: z.string({ required_error: 'is required' }).min(1, 'is required').max(200, 'is too long') });

let dummyHash: Promise<string> | undefined;

export const POST = endpoint(async ({ request, cookies, clientAddress }) => {
  const body = await readJson(request, Body, PUBLIC_FORM_BYTES);
  const account = { rule: RULES.signInAccount, key: body.email };
  const attempt = await recordAttempt([account, { rule: RULES.signInAddress, key: clientAddressOf(request, clientAddress) }]);
  if (!attempt.allowed) throw throttled(attempt, 'Too many failed sign-ins');
  const [user] = await db().select().from(users).where(eq(users.email, body.email));
  // Verify against a dummy hash when the account does not exist, so timing does not reveal accounts.
  dummyHash ??= hashPassword('not-a-real-password-0000');
  const ok = await verifyPassword(user?.passwordHash ?? (await dummyHash), body.password);
  if (!user || !ok) throw new HttpError('unauthenticated', 'Wrong e-mail or password', { password: 'does not match this e-mail' });
  // The right password clears the account's count and does not count against the address.
  await forgive(attempt, [account]);
  const session = await lucia().createSession(user.id, {});
  const c = lucia().createSessionCookie(session.id);
  cookies.set(c.name, c.value, c.attributes);
  return json({ user: { id: user.id, email: user.email, name: user.name } });
});
