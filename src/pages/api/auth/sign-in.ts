// POST /api/auth/sign-in {email, password} → 200 {user}; sets the session cookie. Throttled after repeated failures.
import { z } from 'zod';
import { eq } from 'drizzle-orm';
import { endpoint, json, readJson, HttpError } from '~/lib/server/http';
import { lucia, recordSignIn, signInWait } from '~/lib/server/auth';
import { db } from '~/lib/server/db';
import { users } from '~/lib/server/db/schema';
import { verifyPassword, hashPassword } from '~/lib/server/password';
import { email } from '~/lib/server/validation';
import { clientAddressOf } from '~/lib/server/client-address';

const Body = z.object({ email, password: z.string({ required_error: 'is required' }).min(1, 'is required').max(200, 'is too long') });

let dummyHash: Promise<string> | undefined;

export const POST = endpoint(async ({ request, cookies, clientAddress }) => {
  const body = await readJson(request, Body);
  // The column holds 64 characters: a longer address must not turn into a 500.
  const ip = clientAddressOf(request, clientAddress).slice(0, 64);
  const wait = await signInWait(body.email, ip);
  if (wait > 0) {
    throw new HttpError('too_many_requests', `Too many failed sign-ins. Try again in ${Math.ceil(wait / 60)} minute(s).`, undefined, { retryAfterSeconds: wait }, { 'retry-after': String(wait) });
  }
  const [user] = await db().select().from(users).where(eq(users.email, body.email));
  // Verify against a dummy hash when the account does not exist, so timing does not reveal accounts.
  dummyHash ??= hashPassword('not-a-real-password-0000');
  const ok = await verifyPassword(user?.passwordHash ?? (await dummyHash), body.password);
  await recordSignIn(body.email, ip, Boolean(user && ok));
  if (!user || !ok) throw new HttpError('unauthenticated', 'Wrong e-mail or password', { password: 'does not match this e-mail' });
  const session = await lucia().createSession(user.id, {});
  const c = lucia().createSessionCookie(session.id);
  cookies.set(c.name, c.value, c.attributes);
  return json({ user: { id: user.id, email: user.email, name: user.name } });
});
