// Sessions (lucia, stored in MariaDB through drizzle): sliding 14-day expiry and a 30-day absolute lifetime.
import { Lucia, TimeSpan, type DatabaseSession, type DatabaseUser } from 'lucia';
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle';
import { asc, eq } from 'drizzle-orm';
import { db } from './db';
import { memberships, sessions, studios, users, type Role } from './db/schema';
import { config } from './config';

/** One of the signed-in user's studios, read with the session (authz.requireRole uses it instead of a query). */
export interface SessionMembership {
  studioId: number;
  slug: string;
  name: string;
  role: Role;
}

/**
 * lucia's drizzle adapter, but the session, its user and the user's memberships (with their studios) come back from
 * one query: a request checks its session and the caller's role without a second round trip.
 */
class SessionWithMembershipsAdapter extends DrizzleMySQLAdapter {
  override async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    const rows = await db()
      .select({
        session: sessions,
        user: users,
        studioId: studios.id,
        slug: studios.slug,
        studioName: studios.name,
        role: memberships.role,
      })
      .from(sessions)
      .innerJoin(users, eq(users.id, sessions.userId))
      .leftJoin(memberships, eq(memberships.userId, users.id))
      .leftJoin(studios, eq(studios.id, memberships.studioId))
      .where(eq(sessions.id, sessionId))
      .orderBy(asc(studios.name), asc(studios.id));
    if (!rows.length) return [null, null];
    const { id, userId, expiresAt, ...sessionAttributes } = rows[0].session;
    const { id: uid, ...userAttributes } = rows[0].user;
    const joined: SessionMembership[] = [];
    for (const r of rows) if (r.studioId !== null && r.slug !== null && r.studioName !== null && r.role !== null) joined.push({ studioId: r.studioId, slug: r.slug, name: r.studioName, role: r.role });
    return [
      { id, userId, expiresAt, attributes: sessionAttributes },
      { id: uid, attributes: { ...userAttributes, memberships: joined } },
    ];
  }
}

let instance: Lucia<{ createdAt: Date }, { email: string; name: string; lastActiveAt: Date | null; memberships?: SessionMembership[] }> | undefined;

/** Returns the session manager (created on first use, after the database is configured). */
export function lucia() {
  if (!instance) {
    const adapter = new SessionWithMembershipsAdapter(db(), sessions, users);
    instance = new Lucia(adapter, {
      sessionExpiresIn: new TimeSpan(14, 'd'),
      sessionCookie: {
        name: 'tidemark_session',
        attributes: { secure: config.secureCookies, sameSite: 'lax', path: '/' },
      },
      getUserAttributes: (a) => ({ email: a.email, name: a.name, lastActiveAt: a.lastActiveAt ?? null, memberships: a.memberships }),
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
    DatabaseUserAttributes: { email: string; name: string; lastActiveAt?: Date | null; memberships?: SessionMembership[] };
    DatabaseSessionAttributes: { createdAt?: Date };
  }
}
