// The one access policy. An access object (studio, user, role) comes from the signed-in membership; domain code takes
// it, never Astro's locals. The client-visibility rule lives here and nowhere else:
//   a client sees exactly the versions shared with clients (past draft) of live shots in the shows its membership
//   names (client_shows) and that are not archived, plus the versions of active share links e-mailed to the client's
//   own address (share_link_recipients); a shot or show is visible to a client only through such a version. Anything else: 404.
import type { APIContext, AstroGlobal } from 'astro';
import { and, eq, gt, inArray, isNull, ne, or, sql, type SQL } from 'drizzle-orm';
import { db } from './db';
import { clientShows, notes, shareLinkRecipients, shareLinks, shots, shows, users, versions } from './db/schema';
import { HttpError } from './http';
import { requireRole, type StudioAccess } from './authz';
import type { Role } from '../vocab';

export type Access = StudioAccess;
type Locals = APIContext['locals'] | AstroGlobal['locals'];
type VersionRow = typeof versions.$inferSelect;
type ShotRow = typeof shots.$inferSelect;
type ShowRow = typeof shows.$inferSelect;

export const isClient = (access: Access) => access.role === 'client';

/** The ids of the live (not archived) shows a client membership names (a subquery). */
export function clientShowIds(access: Access) {
  return db()
    .select({ id: clientShows.showId })
    .from(clientShows)
    .innerJoin(shows, eq(shows.id, clientShows.showId))
    .where(and(eq(clientShows.userId, access.userId), eq(clientShows.studioId, access.studioId), isNull(shows.archivedAt)));
}

/**
 * The versions of active share links e-mailed to the client's own address (a subquery): a client account finds a
 * link sent to its address in its home, whether the account existed when the link was sent or was made later.
 */
export function clientLinkedVersionIds(access: Access) {
  return db()
    .select({ id: shareLinks.versionId })
    .from(shareLinkRecipients)
    .innerJoin(shareLinks, eq(shareLinks.id, shareLinkRecipients.shareLinkId))
    .innerJoin(users, eq(users.email, shareLinkRecipients.email))
    .where(and(eq(users.id, access.userId), eq(shareLinkRecipients.studioId, access.studioId), eq(shareLinks.studioId, access.studioId), isNull(shareLinks.revokedAt), gt(shareLinks.expiresAt, sql`NOW()`)));
}

/** Conditions on a `versions ⨝ shots` row for a client to see the version. */
export function clientVersionWhere(access: Access): SQL[] {
  return [
    eq(versions.studioId, access.studioId),
    isNull(shots.archivedAt),
    or(
      and(eq(versions.sharedWithClient, true), ne(versions.reviewState, 'draft'), inArray(shots.showId, clientShowIds(access))),
      inArray(versions.id, clientLinkedVersionIds(access)),
    )!,
  ];
}

/** Ids of the versions a client may see. */
export function clientVersionIds(access: Access) {
  return db()
    .select({ id: versions.id })
    .from(versions)
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .where(and(...clientVersionWhere(access)));
}

/** Ids of the shots a client may see (those with at least one version it may see). */
export function clientShotIds(access: Access) {
  return db()
    .selectDistinct({ id: shots.id })
    .from(versions)
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .where(and(...clientVersionWhere(access)));
}

/** Ids of the shows a client may see (those with at least one version it may see). */
export function clientVisibleShowIds(access: Access) {
  return db()
    .selectDistinct({ id: shots.showId })
    .from(versions)
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .where(and(...clientVersionWhere(access)));
}

/** The version and its shot, or 404 (missing, another studio, or hidden from a client). */
export async function loadVersion(access: Access, versionId: number): Promise<{ version: VersionRow; shot: ShotRow }> {
  const where: SQL[] = [eq(versions.id, versionId), eq(versions.studioId, access.studioId)];
  if (isClient(access)) where.push(...clientVersionWhere(access));
  const [row] = await db().select({ version: versions, shot: shots }).from(versions).innerJoin(shots, eq(shots.id, versions.shotId)).where(and(...where));
  if (!row) throw new HttpError('not_found', 'No such version');
  return row;
}

/** The shot, or 404 (missing, another studio, or hidden from a client). */
export async function loadShot(access: Access, shotId: number): Promise<ShotRow> {
  const where: SQL[] = [eq(shots.id, shotId), eq(shots.studioId, access.studioId)];
  if (isClient(access)) where.push(inArray(shots.id, clientShotIds(access)));
  const [row] = await db().select().from(shots).where(and(...where));
  if (!row) throw new HttpError('not_found', 'No such shot');
  return row;
}

/** The show, or 404 (missing, another studio, or hidden from a client). */
export async function loadShow(access: Access, showId: number): Promise<ShowRow> {
  const where: SQL[] = [eq(shows.id, showId), eq(shows.studioId, access.studioId)];
  if (isClient(access)) where.push(inArray(shows.id, clientVisibleShowIds(access)));
  const [row] = await db().select().from(shows).where(and(...where));
  if (!row) throw new HttpError('not_found', 'No such show');
  return row;
}

// ── From a route id to an access object (the only place that reads locals) ───────────────────────────────────────

/** The access of the signed-in user to the studio owning `studioId`; 401 / 404 / 403 as in requireRole. */
export function accessFor(locals: Locals, studio: number | string, role: Role): Promise<Access> {
  return requireRole(locals, studio, role);
}

/** Access for a route that names only a version id, plus the version (and shot) under the rule. */
export async function versionAccess(locals: Locals, versionId: number, role: Role) {
  if (!locals.user) throw new HttpError('unauthenticated', 'Please sign in');
  // One query finds the version, its shot and so its studio; the role check then needs none (see requireRole).
  const [row] = await db().select({ version: versions, shot: shots }).from(versions).innerJoin(shots, eq(shots.id, versions.shotId)).where(eq(versions.id, versionId));
  if (!row) throw new HttpError('not_found', 'No such version');
  const access = await accessFor(locals, row.version.studioId, role);
  // The studio sees every version of its own; a client only what the rule shows it.
  return { access, ...(isClient(access) ? await loadVersion(access, versionId) : row) };
}

/** Access for a route that names only a note id, plus the note (401 / 404 other studio, internal or hidden from a client / 403). */
export async function noteAccess(locals: Locals, noteId: number, role: Role) {
  if (!locals.user) throw new HttpError('unauthenticated', 'Please sign in');
  const [n] = await db()
    .select({ id: notes.id, studioId: notes.studioId, parentId: notes.parentId, resolvedAt: notes.resolvedAt, internal: notes.internal, versionId: notes.versionId })
    .from(notes)
    .where(eq(notes.id, noteId));
  if (!n) throw new HttpError('not_found', 'No such note');
  const access = await accessFor(locals, n.studioId, role);
  if (isClient(access)) {
    if (n.internal) throw new HttpError('not_found', 'No such note');
    await loadVersion(access, n.versionId).catch(() => {
      throw new HttpError('not_found', 'No such note');
    });
  }
  return { note: n, access };
}

/** Access for a route that names only a shot id, plus the shot under the rule. */
export async function shotAccess(locals: Locals, shotId: number, role: Role) {
  if (!locals.user) throw new HttpError('unauthenticated', 'Please sign in');
  const [row] = await db().select().from(shots).where(eq(shots.id, shotId));
  if (!row) throw new HttpError('not_found', 'No such shot');
  const access = await accessFor(locals, row.studioId, role);
  return { access, shot: isClient(access) ? await loadShot(access, shotId) : row };
}

// ── What a client is shown of a row it may see ──────────────────────────────────────────────────────────────────
// A client gets the fields needed to play and discuss a shared version (code, frame range, timecodes, rate, plate
// for playback); studio-internal fields are blanked, keeping the answer's shape the same for every role.

const hiddenFromClients: Record<string, unknown> = {
  description: '',
  assigneeId: null,
  assigneeName: null,
  dueDate: null,
  reel: null,
  clipName: null,
  comment: null,
  authorId: null,
  authorName: null,
  // The studio's own workflow: the shot's status and who did what in review.
  status: null,
  statusCounts: {},
  actorId: null,
  actorName: null,
};

/** How a client is told who in the studio did something (review events, the inbox). */
export const STUDIO_ACTOR = 'The studio';

/** The row as `access` may see it: unchanged for the studio, internal fields blanked for a client. */
export function asSeenBy<T extends object>(access: Access, row: T): T {
  if (!isClient(access)) return row;
  const out = { ...row } as Record<string, unknown>;
  for (const key of Object.keys(hiddenFromClients)) if (key in out) out[key] = hiddenFromClients[key];
  return out as T;
}
