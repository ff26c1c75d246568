// Sessions (lucia, stored in MariaDB through drizzle) and the sign-in throttle.
import { Lucia, TimeSpan } from 'lucia';
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle';
import { and, eq, gt, sql } from 'drizzle-orm';
import { db } from './db';
import { sessions, users, signInAttempts } from './db/schema';
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

/** Sign-in throttle: more than this many failures in the window locks the address or the account. */
export const THROTTLE = { failures: 5, windowMinutes: 15, perIpFailures: 30 } as const;

/** Returns the number of seconds to wait before another sign-in attempt is allowed (0 = allowed). */
export async function signInWait(email: string, ip: string): Promise<number> {
  const since = new Date(Date.now() - THROTTLE.windowMinutes * 60_000);
  const count = async (where: ReturnType<typeof and>) => {
    const rows = await db()
      .select({ n: sql<number>`count(*)`, first: sql<Date | string | null>`min(${signInAttempts.createdAt})` })
      .from(signInAttempts)
      .where(where);
    const first = rows[0]?.first;
    return { n: Number(rows[0]?.n ?? 0), first: first ? new Date(first) : null };
  };
  const byEmail = await count(and(eq(signInAttempts.email, email), eq(signInAttempts.succeeded, false), gt(signInAttempts.createdAt, since)));
  const byIp = await count(and(eq(signInAttempts.ip, ip), eq(signInAttempts.succeeded, false), gt(signInAttempts.createdAt, since)));
  const wait = (c: { n: number; first: Date | null }, limit: number) =>
    c.n >= limit && c.first ? Math.max(1, Math.ceil((c.first.getTime() + THROTTLE.windowMinutes * 60_000 - Date.now()) / 1000)) : 0;
  return Math.max(wait(byEmail, THROTTLE.failures), wait(byIp, THROTTLE.perIpFailures));
}

export async function recordSignIn(email: string, ip: string, succeeded: boolean): Promise<void> {
  await db().insert(signInAttempts).values({ email, ip, succeeded });
  if (succeeded) {
    // A successful sign-in clears the account's failure count.
    await db().delete(signInAttempts).where(and(eq(signInAttempts.email, email), eq(signInAttempts.succeeded, false)));
  }
}
