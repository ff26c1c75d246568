// Sessions (lucia, stored in MariaDB through drizzle): sliding 14-day expiry and a 30-day absolute lifetime.
import { Lucia, TimeSpan } from 'lucia';
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle';
import { db } from './db';
import { sessions, users } from './db/schema';
import { config } from './config';

let instance: Lucia<{ createdAt: Date }, { email: string; name: string }> | undefined;

/** Returns the session manager (created on first use, after the database is configured). */
export function lucia() {
  if (!instance) {
    const adapter = new DrizzleMySQLAdapter(db(), sessions, users);
    instance = new Lucia(adapter, {
      sessionExpiresIn: new TimeSpan(14, 'd'),
      sessionCookie: {
        name: 'tidemark_session',
        attributes: { secure: config.secureCookies, sameSite: 'lax', path: '/' },
      },
      getUserAttributes: (a) => ({ email: a.email, name: a.name }),
      getSessionAttributes: (a) => ({ createdAt: a.createdAt ? new Date(a.createdAt) : new Date() }),
    });
  }
  return instance;
}

/** However often a session slides (14 days past the last use), it ends this long after sign-in. */
export const SESSION_ABSOLUTE_DAYS = 30;

/** Whether a session began longer ago than the absolute lifetime. */
export const pastAbsoluteLifetime = (createdAt: Date, now = Date.now()) => now - createdAt.getTime() > SESSION_ABSOLUTE_DAYS * 86_400_000;

/**
 * Validates a session cookie value: lucia's sliding expiry, then the absolute lifetime (an old session is deleted).
 * Returns the session and user, or nulls.
 */
export async function validateSessionCookie(sessionId: string) {
  const auth = lucia();
  const result = await auth.validateSession(sessionId);
  if (result.session && pastAbsoluteLifetime(result.session.createdAt)) {
    await auth.invalidateSession(result.session.id);
    return { session: null, user: null } as const;
  }
  return result;
}

declare module 'lucia' {
  interface Register {
    Lucia: ReturnType<typeof lucia>;
    DatabaseUserAttributes: { email: string; name: string };
    DatabaseSessionAttributes: { createdAt?: Date };
  }
}
