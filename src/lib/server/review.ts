// Review on the server: version review transitions (with review events, the audit log and the shot's status in one
// transaction), sharing with clients, frame-pinned notes, the review inbox and version comparison.
// A client sees only versions shared with clients that are past draft, and never internal notes.
import { and, asc, desc, eq, exists, gt, inArray, isNotNull, isNull, lt, ne, notExists, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db, type Db } from './db';
import { assets, auditLog, inboxMarks, memberships, noteReads, notes, reviewEvents, shots, shows, users, versions } from './db/schema';
import { audit } from './audit';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { asSeenBy, clientVersionIds, loadVersion, STUDIO_ACTOR } from './access';
import { decideTransition, shotStatusAfter, type ReviewAction } from '../review/states';
import { healthOf } from '../sim/health';
import { tellStudioOfClientNotes } from './client-notes';
import { diffScenes, countChanges } from '../review/diff';
import type { NoteCreate, NoteView, NotePoint } from '../review/notes';
import type { ReviewState, Role } from '../vocab';
import { notifyDecision, notifySubmitted } from './notify';
import { clientSignOffView } from './client-signoff';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
type VersionRow = typeof versions.$inferSelect;
type ShotRow = typeof shots.$inferSelect;

const isClient = (access: StudioAccess) => access.role === 'client';

/** The review-facing view of a version (no scene). */
export function reviewVersionView(v: VersionRow) {
  return {
    id: v.id,
    shotId: v.shotId,
    number: v.number,
    authorId: v.authorId,
    comment: v.comment,
    reviewState: v.reviewState,
    bakeState: v.bakeState,
    sharedWithClient: v.sharedWithClient,
    ...clientSignOffView(v),
    createdAt: v.createdAt.toISOString(),
    updatedAt: v.updatedAt.toISOString(),
  };
}

async function auditIn(tx: Tx, entry: { studioId: number; actorId: string | null; action: string; targetId: number; detail: Record<string, unknown> }) {
  await tx.insert(auditLog).values({ studioId: entry.studioId, actorId: entry.actorId, action: entry.action, targetType: 'version', targetId: String(entry.targetId), detail: entry.detail });
}

async function followShotStatus(tx: Tx, shotId: number, to: ReviewState) {
  const [shot] = await tx.select({ status: shots.status }).from(shots).where(eq(shots.id, shotId));
  const next = shot ? shotStatusAfter(to, shot.status) : null;
  if (next) await tx.update(shots).set({ status: next }).where(eq(shots.id, shotId));
  return next;
}

// ── Transitions ──────────────────────────────────────────────────────────────────────────────────────────────────

/**
 * Moves a version through the review state machine for a person. In one transaction: locks the shot, then the version
 * (the same order as saving a new version, so the two never deadlock), decides on the locked state, updates it only
 * if it is still the state decided on, writes the review event and the audit entry, and moves the shot's status.
 * Two supervisors deciding at once: the second waits for the lock, sees the new state and gets 409 with currentState.
 * E-mails go out after the commit.
 */
export async function transitionVersion(
  access: StudioAccess, versionId: number, action: Exclude<ReviewAction, 'supersede'>, comment: string | null, overrideReason: string | null = null,
) {
  const result = await db().transaction(async (tx) => {
    const [peek] = await tx.select({ shotId: versions.shotId }).from(versions).where(and(eq(versions.id, versionId), eq(versions.studioId, access.studioId)));
    if (!peek) throw new HttpError('not_found', 'No such version');
    await tx.select({ id: shots.id }).from(shots).where(eq(shots.id, peek.shotId)).for('update');
    const [v] = await tx.select().from(versions).where(eq(versions.id, versionId)).for('update');
    // the bake's health verdict, stored in its clip's meta by the bake runner (null for bakes made before it existed)
    let bakeHealthy: boolean | null = null;
    if (action === 'submit' && v.clipAssetId !== null) {
      const [clip] = await tx.select({ meta: assets.meta }).from(assets).where(eq(assets.id, v.clipAssetId));
      bakeHealthy = healthOf(clip?.meta)?.healthy ?? null;
    }
    // The same person deciding the same again (a double click, a retry after a lost answer): the state they reached,
    // not an error, and nothing written or mailed twice.
    if ((action === 'approve' || action === 'return') && v.reviewState === (action === 'approve' ? 'approved' : 'returned')) {
      const [lastEv] = await tx
        .select()
        .from(reviewEvents)
        .where(eq(reviewEvents.versionId, versionId))
        .orderBy(desc(reviewEvents.id))
        .limit(1)
        // a locking read: the transaction's snapshot (taken before waiting for the shot lock) misses the event the
        // decision that won the lock just wrote
        .for('update');
      if (lastEv && lastEv.actorId === access.userId && lastEv.toState === v.reviewState) {
        return { version: v, eventId: lastEv.id, from: lastEv.fromState, to: lastEv.toState, comment: lastEv.comment, unchanged: true as const };
      }
    }
    const decision = decideTransition({ actor: access.role, action, from: v.reviewState, bakeState: v.bakeState, comment, bakeHealthy, overrideReason });
    // an override is part of the record the supervisor reads: the event's comment carries it
    if (decision.ok && bakeHealthy === false && overrideReason) {
      comment = [comment, `Submitted although the bake went wrong: ${overrideReason.trim()}`].filter(Boolean).join('\n\n');
    }
    if (!decision.ok) {
      if (decision.code === 'conflict') throw new HttpError('conflict', decision.message, undefined, { currentState: v.reviewState });
      throw new HttpError(decision.code, decision.message, decision.field ? { [decision.field]: decision.message.replace(/^\w+: /, '') } : undefined);
    }
    const [updated] = await tx
      .update(versions)
      .set({ reviewState: decision.to })
      .where(and(eq(versions.id, versionId), eq(versions.reviewState, v.reviewState)));
    if (updated.affectedRows !== 1) {
      const [now] = await tx.select({ reviewState: versions.reviewState }).from(versions).where(eq(versions.id, versionId));
      throw new HttpError('conflict', 'Someone else changed this version a moment ago', undefined, { currentState: now?.reviewState });
    }
    const [ev] = await tx.insert(reviewEvents).values({ studioId: access.studioId, versionId, actorId: access.userId, fromState: v.reviewState, toState: decision.to, comment });
    const shotStatus = await followShotStatus(tx, v.shotId, decision.to);
    await auditIn(tx, {
      studioId: access.studioId,
      actorId: access.userId,
      action: `version.${action}`,
      targetId: versionId,
      detail: { from: v.reviewState, to: decision.to, ...(comment ? { comment } : {}), ...(shotStatus ? { shotStatus } : {}) },
    });
    const [fresh] = await tx.select().from(versions).where(eq(versions.id, versionId));
    return { version: fresh, eventId: Number(ev.insertId), from: v.reviewState, to: decision.to, comment, unchanged: false as const };
  });
  if (!result.unchanged) {
    const send = result.to === 'submitted' ? notifySubmitted(versionId, access.userId) : notifyDecision(versionId, access.userId, comment);
    void send.catch((err) => console.error(`[review] e-mail for version ${versionId} failed:`, err));
  }
  return {
    version: reviewVersionView(result.version),
    event: { id: result.eventId, fromState: result.from, toState: result.to, comment: result.comment, actorId: access.userId },
    unchanged: result.unchanged,
  };
}

/**
 * Marks every older version of the shot superseded by a newly saved one, inside the caller's transaction (the shot row
 * must already be locked). Writes a review event and an audit entry per version, and reopens the shot's status.
 */
export async function supersedeOlderVersions(tx: Tx, shot: Pick<ShotRow, 'id' | 'studioId'>, newVersionId: number, actorId: string | null) {
  const older = await tx
    .select({ id: versions.id, reviewState: versions.reviewState, number: versions.number })
    .from(versions)
    .where(and(eq(versions.shotId, shot.id), ne(versions.id, newVersionId), ne(versions.reviewState, 'superseded')))
    .for('update');
  if (older.length === 0) return 0;
  await tx.update(versions).set({ reviewState: 'superseded' }).where(inArray(versions.id, older.map((o) => o.id)));
  await tx.insert(reviewEvents).values(
    older.map((o) => ({ studioId: shot.studioId, versionId: o.id, actorId, fromState: o.reviewState, toState: 'superseded' as const, comment: null })),
  );
  await tx.insert(auditLog).values(
    older.map((o) => ({ studioId: shot.studioId, actorId, action: 'version.supersede', targetType: 'version', targetId: String(o.id), detail: { from: o.reviewState, to: 'superseded', by: newVersionId } })),
  );
  await followShotStatus(tx, shot.id, 'superseded');
  return older.length;
}

/** Shares a version with the studio's clients or stops sharing it (supervisor+). A draft cannot be shared. */
export async function setSharedWithClient(access: StudioAccess, versionId: number, shared: boolean) {
  return db().transaction(async (tx) => {
    const [v] = await tx.select().from(versions).where(and(eq(versions.id, versionId), eq(versions.studioId, access.studioId))).for('update');
    if (!v) throw new HttpError('not_found', 'No such version');
    if (shared && v.reviewState === 'draft') {
      throw new HttpError('conflict', 'A draft stays inside the studio: submit it first, then share it with clients', undefined, { currentState: v.reviewState });
    }
    if (v.sharedWithClient !== shared) {
      await tx.update(versions).set({ sharedWithClient: shared }).where(eq(versions.id, versionId));
      await auditIn(tx, { studioId: access.studioId, actorId: access.userId, action: shared ? 'version.share' : 'version.unshare', targetId: versionId, detail: { shared } });
    }
    const [fresh] = await tx.select().from(versions).where(eq(versions.id, versionId));
    return reviewVersionView(fresh);
  });
}

/** The version's review events, oldest first. A client sees the states but not the studio's comments. */
export async function reviewHistory(access: StudioAccess, versionId: number) {
  const rows = await db()
    .select({ id: reviewEvents.id, fromState: reviewEvents.fromState, toState: reviewEvents.toState, comment: reviewEvents.comment, createdAt: reviewEvents.createdAt, actorId: reviewEvents.actorId, actorName: users.name })
    .from(reviewEvents)
    .leftJoin(users, eq(users.id, reviewEvents.actorId))
    .where(and(eq(reviewEvents.versionId, versionId), eq(reviewEvents.studioId, access.studioId)))
    .orderBy(asc(reviewEvents.createdAt), asc(reviewEvents.id));
  return rows.map((r) => ({
    id: r.id,
    fromState: r.fromState,
    toState: r.toState,
    comment: isClient(access) ? null : r.comment,
    actor: isClient(access) ? { id: null, name: STUDIO_ACTOR } : { id: r.actorId, name: r.actorName ?? 'Tidemark' },
    createdAt: r.createdAt.toISOString(),
  }));
}

// ── Notes ────────────────────────────────────────────────────────────────────────────────────────────────────────

const noteColumns = {
  id: notes.id,
  versionId: notes.versionId,
  versionNumber: versions.number,
  parentId: notes.parentId,
  frame: notes.frame,
  pointX: notes.pointX,
  pointY: notes.pointY,
  stroke: notes.stroke,
  body: notes.body,
  internal: notes.internal,
  authorId: notes.authorId,
  authorName: users.name,
  guestName: notes.guestName,
  resolvedAt: notes.resolvedAt,
  resolvedBy: notes.resolvedBy,
  createdAt: notes.createdAt,
};
interface NoteRow {
  id: number;
  versionId: number;
  versionNumber: number | null;
  parentId: number | null;
  frame: number;
  pointX: number | null;
  pointY: number | null;
  stroke: unknown;
  body: string;
  internal: boolean;
  authorId: string | null;
  authorName: string | null;
  guestName: string | null;
  resolvedAt: Date | null;
  resolvedBy: string | null;
  createdAt: Date;
}

function noteView(r: NoteRow): NoteView {
  const stroke = typeof r.stroke === 'string' ? (JSON.parse(r.stroke) as NotePoint[]) : ((r.stroke as NotePoint[] | null) ?? null);
  return {
    id: r.id,
    versionId: r.versionId,
    versionNumber: r.versionNumber ?? undefined,
    parentId: r.parentId ?? null,
    frame: r.frame,
    point: r.pointX !== null && r.pointY !== null ? { x: r.pointX, y: r.pointY } : null,
    stroke,
    body: r.body,
    internal: r.internal,
    // A share-link viewer's comment says so: the name is what the viewer typed, not a member of the studio.
    author: r.authorId
      ? { id: r.authorId, name: r.authorName ?? 'A former member', guest: false }
      : r.guestName
        ? { id: null, name: `${r.guestName} (guest)`, guest: true }
        : { id: null, name: 'A former member', guest: false },
    resolvedAt: r.resolvedAt ? r.resolvedAt.toISOString() : null,
    resolvedBy: r.resolvedBy ?? null,
    createdAt: r.createdAt.toISOString(),
  };
}

function notesQuery() {
  return db().select(noteColumns).from(notes).innerJoin(versions, eq(versions.id, notes.versionId)).leftJoin(users, eq(users.id, notes.authorId));
}

/** The frame range a note may be pinned to: the scene's timing, else the shot's frame range. */
export function frameRangeOf(v: VersionRow, shot: ShotRow): { first: number; last: number } {
  const timing = (v.scene as { timing?: { startFrame?: unknown; endFrame?: unknown } } | null)?.timing;
  if (timing && Number.isInteger(timing.startFrame) && Number.isInteger(timing.endFrame)) return { first: timing.startFrame as number, last: timing.endFrame as number };
  return { first: shot.firstFrame, last: shot.lastFrame };
}

/** Notes on a version, ordered by frame (replies included, each with its parentId). Clients never get internal notes. */
export async function listNotes(access: StudioAccess, versionId: number) {
  const where: SQL[] = [eq(notes.versionId, versionId), eq(notes.studioId, access.studioId)];
  if (isClient(access)) where.push(eq(notes.internal, false));
  const rows = await notesQuery().where(and(...where)).orderBy(asc(notes.frame), asc(notes.id));
  return rows.map((r) => noteView(r));
}

/**
 * Unresolved notes of the shot's earlier versions (each thread with its replies), so an artist opening the next
 * version sees what is still open. A client gets only non-internal notes of versions they may see.
 */
export async function carriedNotes(access: StudioAccess, v: VersionRow) {
  const verWhere: SQL[] = [eq(versions.shotId, v.shotId), lt(versions.number, v.number), eq(versions.studioId, access.studioId)];
  if (isClient(access)) verWhere.push(inArray(versions.id, clientVersionIds(access)));
  const earlier = await db().select({ id: versions.id }).from(versions).where(and(...verWhere));
  if (earlier.length === 0) return [];
  const where: SQL[] = [inArray(notes.versionId, earlier.map((e) => e.id))];
  if (isClient(access)) where.push(eq(notes.internal, false));
  const rows = (await notesQuery().where(and(...where)).orderBy(asc(notes.frame), asc(notes.id))).map((r) => noteView(r));
  const open = new Set(rows.filter((n) => n.parentId === null && n.resolvedAt === null).map((n) => n.id));
  return rows.filter((n) => (n.parentId === null ? open.has(n.id) : open.has(n.parentId)));
}

/** Records that the user has read the version's notes now (notes by others after this are "new" in the inbox). */
export async function markNotesRead(access: StudioAccess, versionId: number) {
  const now = new Date();
  await db()
    .insert(noteReads)
    .values({ studioId: access.studioId, userId: access.userId, versionId, seenAt: now })
    .onDuplicateKeyUpdate({ set: { seenAt: now } });
}

const fieldError = (field: string, message: string) => new HttpError('validation_failed', `${field}: ${message}`, { [field]: message });

/** Adds a note (or a reply) to a version. Checks the frame range, the parent and who may write internal notes. */
export async function createNote(access: StudioAccess, v: VersionRow, shot: ShotRow, input: NoteCreate) {
  if (isClient(access) && input.internal === true) throw fieldError('internal', 'clients write notes the studio and clients both see');
  let frame = input.frame;
  let internal = isClient(access) ? false : (input.internal ?? true);
  if (input.parentId) {
    const [parent] = await db()
      .select({ id: notes.id, frame: notes.frame, parentId: notes.parentId, internal: notes.internal })
      .from(notes)
      .where(and(eq(notes.id, input.parentId), eq(notes.versionId, v.id), eq(notes.studioId, access.studioId)));
    if (!parent || (isClient(access) && parent.internal)) throw fieldError('parentId', 'is not a note on this version');
    if (parent.parentId !== null) throw fieldError('parentId', 'is a reply: reply to the note it answers');
    frame ??= parent.frame;
    // A reply to an internal note stays inside the studio.
    if (parent.internal) internal = true;
  }
  if (frame === undefined) throw fieldError('frame', 'is required');
  const range = frameRangeOf(v, shot);
  if (frame < range.first || frame > range.last) throw fieldError('frame', `must be within the version's frames ${range.first}–${range.last}`);
  const [res] = await db()
    .insert(notes)
    .values({
      studioId: access.studioId,
      versionId: v.id,
      parentId: input.parentId ?? null,
      authorId: access.userId,
      frame,
      pointX: input.point?.x ?? null,
      pointY: input.point?.y ?? null,
      stroke: input.stroke ?? null,
      body: input.body,
      internal,
      clientSource: isClient(access) ? 'client account' : null,
    });
  const id = Number(res.insertId);
  await markNotesRead(access, v.id);
  if (isClient(access)) {
    await audit({ studioId: access.studioId, actorId: access.userId, action: 'note.client', targetType: 'version', targetId: v.id, detail: { noteId: id, frame } });
    tellStudioOfClientNotes(v.id);
  }
  const [row] = await notesQuery().where(eq(notes.id, id));
  return noteView(row as NoteRow);
}

/** Resolves or reopens a note thread (replies follow their thread, so only top-level notes are resolved). */
export async function setNoteResolved(access: StudioAccess, note: { id: number; parentId: number | null; resolvedAt: Date | null }, resolved: boolean) {
  if (note.parentId !== null) throw fieldError('resolved', 'applies to a whole thread: resolve the note this reply belongs to');
  if (resolved !== (note.resolvedAt !== null)) {
    await db()
      .update(notes)
      .set(resolved ? { resolvedAt: new Date(), resolvedBy: access.userId } : { resolvedAt: null, resolvedBy: null })
      .where(and(eq(notes.id, note.id), eq(notes.studioId, access.studioId)));
  }
  const [row] = await notesQuery().where(eq(notes.id, note.id));
  return noteView(row);
}

// ── Inbox ────────────────────────────────────────────────────────────────────────────────────────────────────────

const noteAuthors = alias(users, 'note_authors');

/** Versions with shot and show codes, for inbox rows. */
function versionRowsQuery() {
  return db()
    .select({
      versionId: versions.id,
      number: versions.number,
      reviewState: versions.reviewState,
      sharedWithClient: versions.sharedWithClient,
      clientState: versions.clientState,
      clientDeciderName: versions.clientDeciderName,
      clientComment: versions.clientComment,
      clientDecidedAt: versions.clientDecidedAt,
      updatedAt: versions.updatedAt,
      shotId: shots.id,
      shotCode: shots.code,
      showCode: shows.code,
      authorId: versions.authorId,
      authorName: users.name,
    })
    .from(versions)
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .innerJoin(shows, eq(shows.id, shots.showId))
    .leftJoin(users, eq(users.id, versions.authorId));
}

/** The latest review event of each version (for "returned by X: comment"). */
async function latestEvents(versionIds: number[]) {
  if (versionIds.length === 0) return new Map<number, { comment: string | null; actorName: string | null; createdAt: Date }>();
  const rows = await db()
    .select({ versionId: reviewEvents.versionId, id: reviewEvents.id, comment: reviewEvents.comment, actorName: users.name, createdAt: reviewEvents.createdAt })
    .from(reviewEvents)
    .leftJoin(users, eq(users.id, reviewEvents.actorId))
    // a supersede is bookkeeping: a returned version keeps showing the return and its comment
    .where(and(inArray(reviewEvents.versionId, versionIds), ne(reviewEvents.toState, 'superseded')))
    .orderBy(asc(reviewEvents.id));
  const out = new Map<number, { comment: string | null; actorName: string | null; createdAt: Date }>();
  for (const r of rows) out.set(r.versionId, r);
  return out;
}

/**
 * Condition for notes that are new to the user on their own versions: by someone else, open, after their last read
 * of the version, and not marked read one by one in the inbox. A superseded version's notes count only while it
 * waits as sent back (returnedWhere): they are what the next version answers.
 */
function newNotesWhere(studioId: number, userId: string): SQL {
  return and(
    eq(notes.studioId, studioId),
    eq(versions.authorId, userId),
    or(isNull(notes.authorId), ne(notes.authorId, userId)),
    isNull(notes.resolvedAt),
    or(ne(versions.reviewState, 'superseded'), returnedWhere(studioId, userId)),
    or(isNull(noteReads.seenAt), gt(notes.createdAt, noteReads.seenAt)),
    notExists(markOf(userId, 'note', notes.id, 'read')),
  )!;
}

/** The user's mark of one kind on an inbox item (a subquery for EXISTS). */
function markOf(userId: string, type: 'shot' | 'version' | 'note', itemId: SQL | typeof notes.id | typeof versions.id, kind: 'read' | 'dismissed') {
  return db()
    .select({ one: sql`1` })
    .from(inboxMarks)
    .where(and(eq(inboxMarks.userId, userId), eq(inboxMarks.itemType, type), eq(inboxMarks.itemId, itemId), isNotNull(kind === 'read' ? inboxMarks.readAt : inboxMarks.dismissedAt)));
}

const laterVersions = alias(versions, 'later_versions');
const returnEvents = alias(reviewEvents, 'return_events');

/**
 * The user's versions that were sent back and still wait for their answer: returned, and (once a newer version was
 * saved, which supersedes them) still shown until a newer version of the shot is submitted or the user dismisses
 * it. Saving a draft is not an answer: the artist works on the notes over several saves, and the returned version
 * with its notes is their list of what to change until they hand the next one in.
 */
function returnedWhere(studioId: number, userId: string): SQL {
  return and(
    eq(versions.studioId, studioId),
    eq(versions.authorId, userId),
    or(
      eq(versions.reviewState, 'returned'),
      and(
        eq(versions.reviewState, 'superseded'),
        exists(db().select({ one: sql`1` }).from(returnEvents).where(and(eq(returnEvents.versionId, versions.id), eq(returnEvents.toState, 'returned')))),
      ),
    ),
    notExists(
      db()
        .select({ one: sql`1` })
        .from(reviewEvents)
        .innerJoin(laterVersions, eq(laterVersions.id, reviewEvents.versionId))
        .where(and(eq(laterVersions.shotId, versions.shotId), gt(laterVersions.number, versions.number), eq(reviewEvents.toState, 'submitted'))),
    ),
    notExists(markOf(userId, 'version', versions.id, 'dismissed')),
  )!;
}

/** Notes joined with their version and the version author's last read of it (for newNotesWhere). */
function newNotesCount() {
  return db()
    .select({ n: sql<number>`count(*)`.mapWith(Number) })
    .from(notes)
    .innerJoin(versions, eq(versions.id, notes.versionId))
    .leftJoin(noteReads, and(eq(noteReads.versionId, notes.versionId), eq(noteReads.userId, versions.authorId)));
}

function newNotesRows() {
  return db()
    .select({ ...noteColumns, authorName: noteAuthors.name })
    .from(notes)
    .innerJoin(versions, eq(versions.id, notes.versionId))
    .leftJoin(noteReads, and(eq(noteReads.versionId, notes.versionId), eq(noteReads.userId, versions.authorId)))
    .leftJoin(noteAuthors, eq(noteAuthors.id, notes.authorId));
}

export interface InboxCounts {
  /** Live shots assigned to the user whose status is blocking (work to do). */
  assigned: number;
  toReview: number;
  returned: number;
  newNotes: number;
  /** Client: versions waiting for their sign-off. Studio: the client's recent decisions (see clientInboxWhere). */
  client: number;
  total: number;
}

/** The user's live shots that wait for their blocking: assigned to them, status blocking, shot and show not archived. */
function assignedWhere(studioId: number, userId: string): SQL {
  return and(eq(shots.studioId, studioId), eq(shots.assigneeId, userId), eq(shots.status, 'blocking'), isNull(shots.archivedAt), isNull(shows.archivedAt))!;
}

/** How long a client's decision stays in the studio's inbox. */
const CLIENT_DECISION_DAYS = 14;

/**
 * The versions of the inbox's client section: for a client, those waiting for their sign-off; for supervisors and
 * owners, every version the client signed off or asked changes on in the last two weeks (not replaced since); for an
 * artist, the same on their own versions.
 */
function clientInboxWhere(access: StudioAccess): SQL {
  const { studioId, userId, role } = access;
  if (role === 'client') return and(eq(versions.studioId, studioId), eq(versions.clientState, 'waiting'), inArray(versions.id, clientVersionIds(access)))!;
  return and(
    eq(versions.studioId, studioId),
    inArray(versions.clientState, ['signed off', 'changes asked']),
    ne(versions.reviewState, 'superseded'),
    gt(versions.clientDecidedAt, new Date(Date.now() - CLIENT_DECISION_DAYS * 86_400_000)),
    ...(role === 'artist' ? [eq(versions.authorId, userId)] : []),
  )!;
}

/** The counts for the navigation: cheap count queries only. */
export async function inboxCounts(studioId: number, userId: string, role: Role): Promise<InboxCounts> {
  const count = sql<number>`count(*)`.mapWith(Number);
  const reviewWhere =
    role === 'client'
      ? and(eq(versions.studioId, studioId), eq(versions.reviewState, 'submitted'), inArray(versions.id, clientVersionIds({ studioId, userId, role } as StudioAccess)))
      : role === 'artist'
        ? undefined
        : and(eq(versions.studioId, studioId), eq(versions.reviewState, 'submitted'));
  const [toReview, returned, newNotes, client, assigned] = await Promise.all([
    reviewWhere ? db().select({ n: count }).from(versions).where(reviewWhere) : Promise.resolve([{ n: 0 }]),
    role === 'client' ? Promise.resolve([{ n: 0 }]) : db().select({ n: count }).from(versions).where(returnedWhere(studioId, userId)),
    role === 'client' ? Promise.resolve([{ n: 0 }]) : newNotesCount().where(newNotesWhere(studioId, userId)),
    db().select({ n: count }).from(versions).where(clientInboxWhere({ studioId, userId, role } as StudioAccess)),
    role === 'client' ? Promise.resolve([{ n: 0 }]) : db().select({ n: count }).from(shots).innerJoin(shows, eq(shows.id, shots.showId)).where(assignedWhere(studioId, userId)),
  ]);
  const c = { assigned: Number(assigned[0]?.n ?? 0), toReview: Number(toReview[0]?.n ?? 0), returned: Number(returned[0]?.n ?? 0), newNotes: Number(newNotes[0]?.n ?? 0), client: Number(client[0]?.n ?? 0) };
  return { ...c, total: c.assigned + c.toReview + c.returned + c.newNotes + c.client };
}

/**
 * What waits for the user in this studio:
 * - toReview: supervisors and owners get every submitted version; a client gets submitted versions shared with them;
 * - returned: the user's own versions that came back (artist and above);
 * - newNotes: the user's own versions with notes by others since they last read them, with the notes;
 * - client: a client's versions waiting for their sign-off, or the studio's recent client decisions (clientInboxWhere).
 */
export async function inboxFor(access: StudioAccess) {
  const { studioId, userId, role } = access;
  const counts = await inboxCounts(studioId, userId, role);
  const reviewWhere: SQL | null =
    role === 'client'
      ? and(eq(versions.studioId, studioId), eq(versions.reviewState, 'submitted'), inArray(versions.id, clientVersionIds(access)))!
      : role === 'artist'
        ? null
        : and(eq(versions.studioId, studioId), eq(versions.reviewState, 'submitted'))!;
  const [toReview, returned, fresh, clientRows] = await Promise.all([
    reviewWhere ? versionRowsQuery().where(reviewWhere).orderBy(asc(versions.updatedAt)).limit(200) : Promise.resolve([]),
    role === 'client'
      ? Promise.resolve([])
      : versionRowsQuery().where(returnedWhere(studioId, userId)).orderBy(desc(versions.updatedAt)).limit(200),
    role === 'client'
      ? Promise.resolve([])
      : newNotesRows()
          .where(newNotesWhere(studioId, userId))
          .orderBy(asc(notes.versionId), asc(notes.frame), asc(notes.id))
          .limit(500),
    versionRowsQuery().where(clientInboxWhere(access)).orderBy(desc(versions.clientDecidedAt), desc(versions.clientSentAt)).limit(200),
  ]);
  const freshNotes = fresh.map((r) => noteView(r));
  const noteVersionIds = [...new Set(freshNotes.map((n) => n.versionId))];
  const [events, noteVersions] = await Promise.all([
    latestEvents([...toReview, ...returned].map((r) => r.versionId)),
    noteVersionIds.length ? versionRowsQuery().where(inArray(versions.id, noteVersionIds)) : Promise.resolve([]),
  ]);
  const item = (r: Awaited<ReturnType<typeof versionRowsQuery>>[number]) => {
    const e = events.get(r.versionId);
    return {
      versionId: r.versionId,
      number: r.number,
      reviewState: r.reviewState,
      shotId: r.shotId,
      shotCode: r.shotCode,
      showCode: r.showCode,
      // A client is not told who in the studio made the version.
      author: role === 'client' ? { id: null, name: 'The studio' } : { id: r.authorId, name: r.authorName ?? 'A former member' },
      updatedAt: r.updatedAt.toISOString(),
      lastEvent: e ? { comment: role === 'client' ? null : e.comment, actorName: role === 'client' ? STUDIO_ACTOR : e.actorName, at: e.createdAt.toISOString() } : null,
      clientState: r.clientState,
      clientDecidedByName: r.clientDeciderName,
      clientComment: r.clientComment,
      clientDecidedAt: r.clientDecidedAt?.toISOString() ?? null,
    };
  };
  const [assigned, seenAt] = await Promise.all([role === 'client' ? Promise.resolve([]) : assignedShots(studioId, userId), inboxSeenAt(studioId, userId)]);
  const versionIds = [...new Set([...toReview, ...returned, ...noteVersions, ...clientRows].map((r) => r.versionId))];
  const [reads, nextOf] = await Promise.all([readMarks(studioId, userId, assigned.map((a) => a.shotId), versionIds), newerVersions(studioId, returned)]);
  // unread: what asks for the reader happened after they read the item (opened the version or the shot, or marked
  // it read) and after their last "mark all read"
  const mark = <T extends { at: string }>(rows: T[], readOf: (r: T) => Date | undefined) =>
    rows.map((r) => {
      const read = [seenAt, readOf(r)].filter((d): d is Date => !!d).reduce<Date | null>((a, b) => (!a || b > a ? b : a), null);
      return { ...r, unread: !read || new Date(r.at) > read };
    });
  const byVersion = (r: { versionId: number }) => reads.version.get(r.versionId);
  const sections = {
    assigned: mark(assigned, (r) => reads.shot.get(r.shotId)),
    toReview: mark(toReview.map(item).map((i) => ({ ...i, at: i.lastEvent?.at ?? i.updatedAt })), byVersion),
    returned: mark(
      returned.map(item).map((i) => ({ ...i, at: i.lastEvent?.at ?? i.updatedAt, nextVersion: nextOf.get(i.versionId) ?? null })),
      byVersion,
    ),
    newNotes: mark(
      noteVersions.map((r) => {
        const own = freshNotes.filter((n) => n.versionId === r.versionId);
        return { ...item(r), notes: own, at: own.map((n) => n.createdAt).sort().at(-1) ?? r.updatedAt.toISOString() };
      }),
      byVersion,
    ),
    client: mark(clientRows.map(item).map((i) => ({ ...i, at: i.clientDecidedAt ?? i.updatedAt })), byVersion),
  };
  const unreadOf = (rows: { unread: boolean }[]) => rows.filter((r) => r.unread).length;
  const unread = {
    assigned: unreadOf(sections.assigned),
    toReview: unreadOf(sections.toReview),
    returned: unreadOf(sections.returned),
    newNotes: unreadOf(sections.newNotes),
    client: unreadOf(sections.client),
  };
  return { counts, unread: { ...unread, total: Object.values(unread).reduce((a, b) => a + b, 0) }, ...sections };
}

/** When the member last opened their inbox in the studio (null: never). */
async function inboxSeenAt(studioId: number, userId: string): Promise<Date | null> {
  const [m] = await db().select({ at: memberships.inboxSeenAt }).from(memberships).where(and(eq(memberships.studioId, studioId), eq(memberships.userId, userId)));
  return m?.at ?? null;
}

/**
 * When the user last read each inbox item: a shot by its read mark, a version by the later of its read mark's
 * and their last read of its notes (opening the version page reads them).
 */
async function readMarks(studioId: number, userId: string, shotIds: number[], versionIds: number[]) {
  const which: SQL[] = [];
  if (shotIds.length) which.push(and(eq(inboxMarks.itemType, 'shot'), inArray(inboxMarks.itemId, shotIds))!);
  if (versionIds.length) which.push(and(eq(inboxMarks.itemType, 'version'), inArray(inboxMarks.itemId, versionIds))!);
  const [marks, noteSeen] = await Promise.all([
    which.length
      ? db()
          .select({ type: inboxMarks.itemType, id: inboxMarks.itemId, at: inboxMarks.readAt })
          .from(inboxMarks)
          .where(and(eq(inboxMarks.studioId, studioId), eq(inboxMarks.userId, userId), isNotNull(inboxMarks.readAt), or(...which)))
      : Promise.resolve([]),
    versionIds.length
      ? db().select({ id: noteReads.versionId, at: noteReads.seenAt }).from(noteReads).where(and(eq(noteReads.userId, userId), inArray(noteReads.versionId, versionIds)))
      : Promise.resolve([]),
  ]);
  const shot = new Map<number, Date>();
  const version = new Map<number, Date>();
  for (const m of marks) if (m.at) (m.type === 'shot' ? shot : version).set(m.id, m.at);
  for (const r of noteSeen) if (!version.has(r.id) || r.at > version.get(r.id)!) version.set(r.id, r.at);
  return { shot, version };
}

/** For each returned version that a newer one superseded: the newest version of its shot saved since. */
async function newerVersions(studioId: number, returned: { versionId: number; shotId: number; number: number; reviewState: string }[]) {
  const out = new Map<number, { id: number; number: number; reviewState: string }>();
  const superseded = returned.filter((r) => r.reviewState === 'superseded');
  if (!superseded.length) return out;
  const rows = await db()
    .select({ id: versions.id, shotId: versions.shotId, number: versions.number, reviewState: versions.reviewState })
    .from(versions)
    .where(and(eq(versions.studioId, studioId), inArray(versions.shotId, [...new Set(superseded.map((r) => r.shotId))])));
  for (const r of superseded) {
    const newest = rows.filter((v) => v.shotId === r.shotId && v.number > r.number).sort((a, b) => b.number - a.number)[0];
    if (newest) out.set(r.versionId, { id: newest.id, number: newest.number, reviewState: newest.reviewState });
  }
  return out;
}

export type InboxItemRef = { type: 'shot' | 'version' | 'note'; id: number };

/**
 * Marks inbox items read for the user: a shot (an assignment), a version (as opening it does: its notes count as
 * read) or one note. Each must be one the user may see in the studio (404 otherwise).
 */
export async function markInboxItemsRead(access: StudioAccess, items: InboxItemRef[]) {
  const now = new Date();
  for (const it of items) {
    if (it.type === 'version') {
      const { version } = await loadVersion(access, it.id);
      await markNotesRead(access, version.id);
      continue;
    }
    if (it.type === 'shot') {
      const [row] = await db().select({ id: shots.id }).from(shots).where(and(eq(shots.id, it.id), eq(shots.studioId, access.studioId)));
      if (!row || isClient(access)) throw new HttpError('not_found', `No such shot: ${it.id}`, { items: `shot ${it.id} is not in this studio` });
    } else {
      const [row] = await db()
        .select({ id: notes.id, versionId: notes.versionId, internal: notes.internal })
        .from(notes)
        .where(and(eq(notes.id, it.id), eq(notes.studioId, access.studioId)));
      if (!row || (isClient(access) && row.internal)) throw new HttpError('not_found', `No such note: ${it.id}`, { items: `note ${it.id} is not in this studio` });
      await loadVersion(access, row.versionId);
    }
    await db()
      .insert(inboxMarks)
      .values({ studioId: access.studioId, userId: access.userId, itemType: it.type, itemId: it.id, readAt: now })
      .onDuplicateKeyUpdate({ set: { readAt: now } });
  }
}

/** Records that the user has read the shot (its page was opened): an assignment to them stops counting as new. */
export async function markShotRead(access: StudioAccess, shotId: number) {
  const now = new Date();
  await db()
    .insert(inboxMarks)
    .values({ studioId: access.studioId, userId: access.userId, itemType: 'shot', itemId: shotId, readAt: now })
    .onDuplicateKeyUpdate({ set: { readAt: now } });
}

/** "Mark all read": everything in the member's inbox now counts as read, and the new notes on their versions too. */
export async function markInboxSeen(access: StudioAccess) {
  await db().update(memberships).set({ inboxSeenAt: new Date() }).where(and(eq(memberships.studioId, access.studioId), eq(memberships.userId, access.userId)));
  if (isClient(access)) return;
  const withNotes = await db()
    .selectDistinct({ versionId: notes.versionId })
    .from(notes)
    .innerJoin(versions, eq(versions.id, notes.versionId))
    .leftJoin(noteReads, and(eq(noteReads.versionId, notes.versionId), eq(noteReads.userId, versions.authorId)))
    .where(newNotesWhere(access.studioId, access.userId))
    .limit(500);
  for (const v of withNotes) await markNotesRead(access, v.versionId);
}

/**
 * Takes a version sent back off the user's inbox before a newer version is submitted (they answered it another way).
 * The mark concerns only the user's own inbox, so dismissing twice, or a version not listed there, changes nothing.
 */
export async function dismissReturned(access: StudioAccess, versionId: number) {
  const { version } = await loadVersion(access, versionId);
  const now = new Date();
  await db()
    .insert(inboxMarks)
    .values({ studioId: access.studioId, userId: access.userId, itemType: 'version', itemId: version.id, dismissedAt: now })
    .onDuplicateKeyUpdate({ set: { dismissedAt: now } });
}

/**
 * The user's shots waiting for their blocking (assignedWhere), each with when it was assigned to them: the latest
 * audit entry that set them as assignee (else the shot's creation).
 */
async function assignedShots(studioId: number, userId: string) {
  const rows = await db()
    .select({ shotId: shots.id, shotCode: shots.code, showCode: shows.code, status: shots.status, dueDate: shots.dueDate, createdAt: shots.createdAt, description: shots.description })
    .from(shots)
    .innerJoin(shows, eq(shows.id, shots.showId))
    .where(assignedWhere(studioId, userId))
    .orderBy(asc(shots.dueDate), asc(shots.code))
    .limit(200);
  if (rows.length === 0) return [];
  const entries = await db()
    .select({ targetId: auditLog.targetId, detail: auditLog.detail, createdAt: auditLog.createdAt, actorName: users.name })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(
      and(
        eq(auditLog.studioId, studioId),
        eq(auditLog.targetType, 'shot'),
        inArray(auditLog.action, ['shot.workflow', 'shot.update']),
        inArray(auditLog.targetId, rows.map((r) => String(r.shotId))),
        sql`JSON_UNQUOTE(JSON_EXTRACT(${auditLog.detail}, '$.assigneeId.to')) = ${userId}`,
      ),
    )
    .orderBy(desc(auditLog.createdAt), desc(auditLog.id));
  const latest = new Map<string, { at: Date; by: string | null }>();
  for (const e of entries) if (e.targetId && !latest.has(e.targetId)) latest.set(e.targetId, { at: e.createdAt, by: e.actorName });
  return rows.map((r) => {
    const a = latest.get(String(r.shotId));
    return {
      shotId: r.shotId,
      shotCode: r.shotCode,
      showCode: r.showCode,
      description: r.description,
      dueDate: r.dueDate ? String(r.dueDate).slice(0, 10) : null,
      assignedBy: a?.by ?? null,
      at: (a?.at ?? r.createdAt).toISOString(),
    };
  });
}

// ── Compare ──────────────────────────────────────────────────────────────────────────────────────────────────────

/** Two versions of the same shot with their scenes and the change table from `a` to `b` (404 for one the reader may not see). */
export async function compareVersions(access: StudioAccess, aId: number, bId: number) {
  const [a, b] = await Promise.all([loadVersion(access, aId), loadVersion(access, bId)]);
  if (a.version.shotId !== b.version.shotId) throw fieldError('b', 'must be a version of the same shot as a');
  const shot = a.shot;
  const [show] = await db().select({ code: shows.code, name: shows.name }).from(shows).where(eq(shows.id, shot.showId));
  const changes = diffScenes(a.version.scene, b.version.scene);
  // every version of the shot the reader may see, for the pickers
  const pickable = await db()
    .select({ id: versions.id, number: versions.number, reviewState: versions.reviewState, bakeState: versions.bakeState })
    .from(versions)
    .where(and(eq(versions.shotId, shot.id), eq(versions.studioId, access.studioId), ...(isClient(access) ? [inArray(versions.id, clientVersionIds(access))] : [])))
    .orderBy(desc(versions.number));
  // a version sent back and then superseded still reads as sent back in the pickers (clients are not told)
  const sentBack = new Set(
    isClient(access) || !pickable.length
      ? []
      : (
          await db()
            .select({ id: reviewEvents.versionId })
            .from(reviewEvents)
            .where(and(inArray(reviewEvents.versionId, pickable.map((p) => p.id)), eq(reviewEvents.toState, 'returned')))
        ).map((r) => r.id),
  );
  return {
    versions: pickable.map((p) => ({ ...p, sentBack: sentBack.has(p.id) })),
    shot: {
      id: shot.id,
      code: shot.code,
      showCode: show?.code ?? null,
      firstFrame: shot.firstFrame,
      lastFrame: shot.lastFrame,
      plateFirstFrame: shot.plateFirstFrame,
      plateWidth: shot.plateWidth,
      plateHeight: shot.plateHeight,
      metresPerPixel: shot.metresPerPixel,
      plateAssetId: shot.plateAssetId,
    },
    a: { ...asSeenBy(access, reviewVersionView(a.version)), scene: a.version.scene, plateAssetId: a.version.plateAssetId },
    b: { ...asSeenBy(access, reviewVersionView(b.version)), scene: b.version.scene, plateAssetId: b.version.plateAssetId },
    changes,
    counts: countChanges(changes),
  };
}
