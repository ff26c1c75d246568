// Authorization: one function decides who may do what in a studio. Roles nest: owner ⊇ supervisor ⊇ artist.
// A client is a separate, narrow role: it sees only what a supervisor shared with clients.
import type { APIContext, AstroGlobal } from 'astro';
import { and, eq } from 'drizzle-orm';
import { db } from './db';
import { memberships, studios, type Role } from './db/schema';
import { HttpError } from './http';

const rank: Record<Role, number> = { client: 0, artist: 1, supervisor: 2, owner: 3 };

export interface StudioAccess {
  studioId: number;
  studioSlug: string;
  studioName: string;
  userId: string;
  role: Role;
}

type Locals = APIContext['locals'] | AstroGlobal['locals'];

/** True when `role` includes the powers of `needed` (a client only ever satisfies 'client'). */
export function roleAtLeast(role: Role, needed: Role): boolean {
  if (needed === 'client') return true;
  if (role === 'client') return false;
  return rank[role] >= rank[needed];
}

/**
 * Returns the signed-in user's access to the studio, or throws: 401 when signed out,
 * 404 when not a member (another studio's ids are not confirmed to exist), 403 when the role is too low.
 */
export async function requireRole(locals: Locals, studio: number | string, needed: Role): Promise<StudioAccess> {
  const user = locals.user;
  if (!user) throw new HttpError('unauthenticated', 'Please sign in');
  // The memberships read with the session (see auth.ts) answer without a query; anything else (a slug spelt
  // differently, a membership made during this request) asks the database as before.
  const known = user.memberships?.find((m) => (typeof studio === 'number' ? m.studioId === studio : m.slug === studio));
  if (known) {
    if (!roleAtLeast(known.role, needed)) throw new HttpError('forbidden', `This needs the ${needed} role or above`);
    return { studioId: known.studioId, studioSlug: known.slug, studioName: known.name, userId: user.id, role: known.role };
  }
  const rows = await db()
    .select({ studioId: studios.id, slug: studios.slug, name: studios.name, role: memberships.role })
    .from(memberships)
    .innerJoin(studios, eq(studios.id, memberships.studioId))
    .where(and(eq(memberships.userId, user.id), typeof studio === 'number' ? eq(studios.id, studio) : eq(studios.slug, studio)))
    .limit(1);
  const row = rows[0];
  if (!row) throw new HttpError('not_found', 'No such studio');
  if (!roleAtLeast(row.role, needed)) throw new HttpError('forbidden', `This needs the ${needed} role or above`);
  return { studioId: row.studioId, studioSlug: row.slug, studioName: row.name, userId: user.id, role: row.role };
}

/** Returns 401 unless signed in; gives back the user. */
export function requireUser(locals: Locals) {
  if (!locals.user) throw new HttpError('unauthenticated', 'Please sign in');
  return locals.user;
}

/**
 * Lists the studios the user belongs to, with their role (for the studio switcher). Given the memberships read with
 * the session (same order: by studio name), answers from them.
 */
export async function studiosOf(userId: string, known?: { studioId: number; slug: string; name: string; role: Role }[]) {
  if (known) return known.map((m) => ({ id: m.studioId, slug: m.slug, name: m.name, role: m.role }));
  return db()
    .select({ id: studios.id, slug: studios.slug, name: studios.name, role: memberships.role })
    .from(memberships)
    .innerJoin(studios, eq(studios.id, memberships.studioId))
    .where(eq(memberships.userId, userId))
    .orderBy(studios.name);
}
