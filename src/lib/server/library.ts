// The shot library on the server: shows and shots (tables with server-side sort/filter/pagination), versions listed
// on a shot, inline and bulk edits, and imports from edit lists. Every query filters by studio_id; a client sees only
// shows that have at least one version shared with clients, and only the shared versions.
import { and, asc, desc, eq, inArray, isNotNull, isNull, ne, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from './db';
import { assets, memberships, shots, shows, studios, users, versions } from './db/schema';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { audit } from './audit';
import { asSeenBy, clientShotIds, clientVersionIds, clientVisibleShowIds } from './access';
import { presignGetShared } from './storage';
import type { HandleConvention, ShotStatus } from '../vocab';
import type { ImportBody, ShotCreate, ShotListQuery, ShotPatch, ShowCreate, ShowListQuery, ShowPatch } from '../library/schemas';
import { previewText, type ImportPreview, type ShotSource } from '../edl';
import { framesToTimecode, isFrameRate, timecodeToFrames, TimecodeError, type FrameRate } from '../timecode';

// ── Helpers ──────────────────────────────────────────────────────────────────────────────────────────────────────

/** True when a database error is a unique-key violation (MariaDB error 1062), also when drizzle wrapped it. */
export function isDuplicateKey(err: unknown): boolean {
  for (let e: any = err; e; e = e.cause) if (e.code === 'ER_DUP_ENTRY' || e.errno === 1062) return true;
  return false;
}

/** Escapes LIKE wildcards so a search for "CNB_0" matches the underscore literally. */
function likeContains(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

const isClient = (access: StudioAccess) => access.role === 'client';

/** Ids of the studio's shows that have at least one version shared with clients (a subquery). */

function paging(page: number, pageSize: number) {
  return { limit: pageSize, offset: (page - 1) * pageSize };
}

// Written out in full: in a single-table select drizzle drops table names from column references, which would
// make `id` in a correlated subquery mean the inner table's id.
const shotCountSql = sql<number>`(${sql.raw('select count(*) from `shots` as `sc` where `sc`.`show_id` = `shows`.`id` and `sc`.`archived_at` is null')})`.mapWith(Number);

// ── Shows ────────────────────────────────────────────────────────────────────────────────────────────────────────

const showColumns = {
  id: shows.id,
  code: shows.code,
  name: shows.name,
  description: shows.description,
  frameRate: shows.frameRate,
  archivedAt: shows.archivedAt,
  createdAt: shows.createdAt,
  updatedAt: shows.updatedAt,
  shotCount: shotCountSql,
};

/** One page of the studio's shows with the total count. Stable order: the sort column, then id. */
export async function listShows(access: StudioAccess, query: ShowListQuery) {
  const where: SQL[] = [eq(shows.studioId, access.studioId)];
  if (query.archived === 'false') where.push(isNull(shows.archivedAt));
  if (query.archived === 'true') where.push(isNotNull(shows.archivedAt));
  if (query.q) where.push(or(sql`${shows.code} like ${likeContains(query.q)}`, sql`${shows.name} like ${likeContains(query.q)}`)!);
  if (isClient(access)) where.push(inArray(shows.id, clientVisibleShowIds(access)));
  const dir = query.order === 'desc' ? desc : asc;
  const sortColumn = { code: shows.code, name: shows.name, updated: shows.updatedAt, shots: shotCountSql }[query.sort];
  const { limit, offset } = paging(query.page, query.pageSize);
  const [items, [{ total }]] = await Promise.all([
    db()
      .select(showColumns)
      .from(shows)
      .where(and(...where))
      .orderBy(dir(sortColumn), dir(shows.id))
      .limit(limit)
      .offset(offset),
    db()
      .select({ total: sql<number>`count(*)`.mapWith(Number) })
      .from(shows)
      .where(and(...where)),
  ]);
  return { items, total, page: query.page, pageSize: query.pageSize };
}

/** Returns the show (404 when missing, in another studio, or hidden from a client). */
export async function getShowRow(access: StudioAccess, showId: number) {
  const where: SQL[] = [eq(shows.id, showId), eq(shows.studioId, access.studioId)];
  if (isClient(access)) where.push(inArray(shows.id, clientVisibleShowIds(access)));
  const [row] = await db().select(showColumns).from(shows).where(and(...where));
  if (!row) throw new HttpError('not_found', 'No such show');
  return row;
}

/** The show with its shot counts by status (active shots only). */
export async function getShow(access: StudioAccess, showId: number) {
  const show = await getShowRow(access, showId);
  const counts = await db()
    .select({ status: shots.status, n: sql<number>`count(*)`.mapWith(Number) })
    .from(shots)
    .where(and(eq(shots.showId, showId), eq(shots.studioId, access.studioId), isNull(shots.archivedAt)))
    .groupBy(shots.status);
  return asSeenBy(access, { ...show, statusCounts: Object.fromEntries(counts.map((c) => [c.status, c.n])) as Partial<Record<ShotStatus, number>> });
}

const showCodeTaken = (code: string) => new HttpError('conflict', `A show with code ${code} already exists in this studio`, { code: 'is already used by another show' });

export async function createShow(access: StudioAccess, body: ShowCreate) {
  const [taken] = await db()
    .select({ id: shows.id })
    .from(shows)
    .where(and(eq(shows.studioId, access.studioId), eq(shows.code, body.code)));
  if (taken) throw showCodeTaken(body.code);
  let id: number;
  try {
    const [res] = await db()
      .insert(shows)
      .values({ studioId: access.studioId, code: body.code, name: body.name, description: body.description ?? null, frameRate: body.frameRate });
    id = Number(res.insertId);
  } catch (e) {
    if (isDuplicateKey(e)) throw showCodeTaken(body.code);
    throw e;
  }
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'show.create', targetType: 'show', targetId: id, detail: { code: body.code } });
  return getShow(access, id);
}

export async function updateShow(access: StudioAccess, showId: number, body: ShowPatch) {
  const before = await getShowRow(access, showId);
  const changes: Partial<typeof shows.$inferInsert> = {};
  if (body.code !== undefined) changes.code = body.code;
  if (body.name !== undefined) changes.name = body.name;
  if (body.description !== undefined) changes.description = body.description;
  if (body.frameRate !== undefined) changes.frameRate = body.frameRate;
  if (body.code !== undefined && body.code !== before.code) {
    const [taken] = await db()
      .select({ id: shows.id })
      .from(shows)
      .where(and(eq(shows.studioId, access.studioId), eq(shows.code, body.code), ne(shows.id, showId)));
    if (taken) throw showCodeTaken(body.code);
  }
  try {
    await db()
      .update(shows)
      .set(changes)
      .where(and(eq(shows.id, showId), eq(shows.studioId, access.studioId)));
  } catch (e) {
    if (isDuplicateKey(e)) throw showCodeTaken(body.code ?? '');
    throw e;
  }
  await audit({
    studioId: access.studioId,
    actorId: access.userId,
    action: 'show.update',
    targetType: 'show',
    targetId: showId,
    detail: { fields: Object.keys(changes) },
  });
  return getShow(access, showId);
}

export async function setShowArchived(access: StudioAccess, showId: number, archived: boolean) {
  await getShowRow(access, showId);
  await db()
    .update(shows)
    .set({ archivedAt: archived ? new Date() : null })
    .where(and(eq(shows.id, showId), eq(shows.studioId, access.studioId)));
  await audit({ studioId: access.studioId, actorId: access.userId, action: archived ? 'show.archive' : 'show.unarchive', targetType: 'show', targetId: showId });
  return getShow(access, showId);
}

// ── Shots ────────────────────────────────────────────────────────────────────────────────────────────────────────

/** The shot's tail handles as a select column: the head's count where the tail was never stored apart (null). */
function tailHandlesColumn() {
  return sql<number>`coalesce(${shots.tailHandles}, ${shots.headHandles})`.mapWith(Number);
}

const shotColumns = {
  id: shots.id,
  showId: shots.showId,
  showCode: shows.code,
  code: shots.code,
  description: shots.description,
  firstFrame: shots.firstFrame,
  lastFrame: shots.lastFrame,
  headHandles: shots.headHandles,
  tailHandles: tailHandlesColumn(),
  frameRate: shots.frameRate,
  plateWidth: shots.plateWidth,
  plateHeight: shots.plateHeight,
  pixelAspect: shots.pixelAspect,
  assigneeId: shots.assigneeId,
  assigneeName: users.name,
  dueDate: shots.dueDate,
  status: shots.status,
  plateAssetId: shots.plateAssetId,
  thumbnailAssetId: shots.thumbnailAssetId,
  metresPerPixel: shots.metresPerPixel,
  sourceTimecodeIn: shots.sourceTimecodeIn,
  plateFirstFrame: shots.plateFirstFrame,
  recordIn: shots.recordIn,
  recordOut: shots.recordOut,
  reel: shots.reel,
  clipName: shots.clipName,
  archivedAt: shots.archivedAt,
  createdAt: shots.createdAt,
  updatedAt: shots.updatedAt,
};

/** How long a thumbnail URL in a shot answer lives: the tables refetch on focus, well within it. */
export const THUMBNAIL_URL_SECONDS = 900;

/** Short-lived GET URLs of the given thumbnail assets of the studio, by asset id (missing ids are left out). */
async function thumbnailUrls(studioId: number, ids: (number | null)[]): Promise<Map<number, string>> {
  const wanted = [...new Set(ids.filter((id): id is number => !!id))];
  if (!wanted.length) return new Map();
  const rows = await db()
    .select({ id: assets.id, storageKey: assets.storageKey })
    .from(assets)
    .where(and(eq(assets.studioId, studioId), inArray(assets.id, wanted)));
  return new Map(await Promise.all(rows.map(async (r) => [r.id, await presignGetShared(r.storageKey, THUMBNAIL_URL_SECONDS)] as const)));
}

/** Adds `thumbnailUrl` (a short-lived URL of the shot's thumbnail, or null) to shot rows. */
async function withThumbnailUrls<T extends { thumbnailAssetId: number | null }>(studioId: number, rows: T[]): Promise<(T & { thumbnailUrl: string | null })[]> {
  const urls = await thumbnailUrls(studioId, rows.map((r) => r.thumbnailAssetId));
  return rows.map((r) => ({ ...r, thumbnailUrl: (r.thumbnailAssetId && urls.get(r.thumbnailAssetId)) || null }));
}

function shotsQuery() {
  return db().select(shotColumns).from(shots).innerJoin(shows, eq(shows.id, shots.showId)).leftJoin(users, eq(users.id, shots.assigneeId));
}

const thumbnails = alias(assets, 'thumbnails');

/**
 * One page of shots, within a show (query.showId) or across the studio, with the total count.
 * Status sorts in workflow order (the column is an ENUM: MariaDB orders it by the list's order). Ties break on id.
 * One query in the usual case: the total rides on each row (a window count), the thumbnail's storage key comes
 * joined, and the show is looked up apart only when the page is empty (to tell an empty page from a missing show).
 */
export async function listShots(access: StudioAccess, query: ShotListQuery) {
  const where: SQL[] = [eq(shots.studioId, access.studioId)];
  if (query.showId !== undefined) where.push(eq(shots.showId, query.showId));
  if (query.archived === 'false') where.push(isNull(shots.archivedAt), isNull(shows.archivedAt));
  if (query.archived === 'true') where.push(or(isNotNull(shots.archivedAt), isNotNull(shows.archivedAt))!);
  if (query.status) where.push(inArray(shots.status, query.status));
  if (query.assignee === 'none') where.push(isNull(shots.assigneeId));
  else if (query.assignee) where.push(eq(shots.assigneeId, query.assignee));
  if (query.q) where.push(or(sql`${shots.code} like ${likeContains(query.q)}`, sql`${shots.description} like ${likeContains(query.q)}`)!);
  if (isClient(access)) where.push(inArray(shots.id, clientShotIds(access)));
  const dir = query.order === 'desc' ? desc : asc;
  const order: SQL[] = {
    code: [dir(shots.code)],
    status: [dir(shots.status)],
    firstFrame: [dir(shots.firstFrame)],
    // Shots without a due date come last either way.
    dueDate: [asc(sql`${shots.dueDate} is null`), dir(shots.dueDate)],
    updated: [dir(shots.updatedAt)],
  }[query.sort];
  const { limit, offset } = paging(query.page, query.pageSize);
  const rows = await db()
    .select({ ...shotColumns, thumbnailKey: thumbnails.storageKey, total: sql<number>`count(*) over ()`.mapWith(Number) })
    .from(shots)
    .innerJoin(shows, eq(shows.id, shots.showId))
    .leftJoin(users, eq(users.id, shots.assigneeId))
    .leftJoin(thumbnails, and(eq(thumbnails.id, shots.thumbnailAssetId), eq(thumbnails.studioId, shots.studioId)))
    .where(and(...where))
    .orderBy(...order, dir(shots.id))
    .limit(limit)
    .offset(offset);
  let total = rows[0]?.total ?? 0;
  if (!rows.length) {
    // A shot on the page proves its show is there and visible (same studio; a client sees a shot only through a
    // version of a show it may see); an empty page does not.
    if (query.showId !== undefined) await getShowRow(access, query.showId);
    if (offset > 0) {
      const [counted] = await db()
        .select({ total: sql<number>`count(*)`.mapWith(Number) })
        .from(shots)
        .innerJoin(shows, eq(shows.id, shots.showId))
        .where(and(...where));
      total = counted.total;
    }
  }
  const items = await Promise.all(
    rows.map(async ({ thumbnailKey, total: _total, ...r }) => {
      const thumbnailUrl = r.thumbnailAssetId && thumbnailKey ? await presignGetShared(thumbnailKey, THUMBNAIL_URL_SECONDS) : null;
      return asSeenBy(access, { ...r, thumbnailUrl });
    }),
  );
  return { items, total, page: query.page, pageSize: query.pageSize };
}

/** Returns the shot row (404 when missing, in another studio, or in a show hidden from a client). */
export async function getShotRow(access: StudioAccess, shotId: number) {
  const where: SQL[] = [eq(shots.id, shotId), eq(shots.studioId, access.studioId)];
  if (isClient(access)) where.push(inArray(shots.id, clientShotIds(access)));
  const [row] = await shotsQuery().where(and(...where));
  if (!row) throw new HttpError('not_found', 'No such shot');
  return row;
}

/** The shot with its current plate, its thumbnail and its versions (newest first; a client sees shared ones only). */
export async function getShot(access: StudioAccess, shotId: number) {
  const shot = await getShotRow(access, shotId);
  const versionWhere: SQL[] = [eq(versions.shotId, shotId), eq(versions.studioId, access.studioId)];
  if (isClient(access)) versionWhere.push(inArray(versions.id, clientVersionIds(access)));
  const [versionRows, plateRows] = await Promise.all([
    db()
      .select({
        id: versions.id,
        number: versions.number,
        authorId: versions.authorId,
        authorName: users.name,
        createdAt: versions.createdAt,
        bakeState: versions.bakeState,
        reviewState: versions.reviewState,
        sharedWithClient: versions.sharedWithClient,
        clientState: versions.clientState,
        plateAssetId: versions.plateAssetId,
        clipAssetId: versions.clipAssetId,
      })
      .from(versions)
      .leftJoin(users, eq(users.id, versions.authorId))
      .where(and(...versionWhere))
      .orderBy(desc(versions.number)),
    shot.plateAssetId || shot.thumbnailAssetId
      ? db()
          .select({ id: assets.id, kind: assets.kind, contentType: assets.contentType, byteSize: assets.byteSize, width: assets.width, height: assets.height, format: assets.format, createdAt: assets.createdAt })
          .from(assets)
          .where(and(eq(assets.studioId, access.studioId), inArray(assets.id, [shot.plateAssetId ?? 0, shot.thumbnailAssetId ?? 0])))
      : Promise.resolve([]),
  ]);
  const [withUrl] = await withThumbnailUrls(access.studioId, [shot]);
  return {
    ...asSeenBy(access, withUrl),
    plate: plateRows.find((a) => a.id === shot.plateAssetId) ?? null,
    thumbnail: plateRows.find((a) => a.id === shot.thumbnailAssetId) ?? null,
    versions: versionRows.map((v) => asSeenBy(access, v)),
  };
}

const shotCodeTaken = (code: string) => new HttpError('conflict', `Shot ${code} already exists in this show`, { code: 'is already used by another shot in this show' });

/** Throws 400 naming assigneeId unless the user is an artist, supervisor or owner of the studio. */
async function checkAssignee(studioId: number, userId: string | null | undefined) {
  if (!userId) return;
  const [m] = await db()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.studioId, studioId), eq(memberships.userId, userId)));
  if (!m || m.role === 'client') {
    throw new HttpError('validation_failed', 'assigneeId: is not an artist, supervisor or owner of this studio', {
      assigneeId: 'is not an artist, supervisor or owner of this studio',
    });
  }
}

export async function createShot(access: StudioAccess, body: ShotCreate) {
  const [show] = await db()
    .select({ id: shows.id, frameRate: shows.frameRate, archivedAt: shows.archivedAt })
    .from(shows)
    .where(and(eq(shows.id, body.showId), eq(shows.studioId, access.studioId)));
  if (!show) throw new HttpError('validation_failed', 'showId: no such show in this studio', { showId: 'no such show in this studio' });
  if (show.archivedAt) throw new HttpError('conflict', 'This show is archived: unarchive it before adding shots', { showId: 'is archived' });
  await checkAssignee(access.studioId, body.assigneeId);
  const [taken] = await db()
    .select({ id: shots.id })
    .from(shots)
    .where(and(eq(shots.showId, body.showId), eq(shots.code, body.code)));
  if (taken) throw shotCodeTaken(body.code);
  let id: number;
  try {
    const [res] = await db()
      .insert(shots)
      .values({
        studioId: access.studioId,
        showId: body.showId,
        code: body.code,
        description: body.description ?? null,
        firstFrame: body.firstFrame,
        lastFrame: body.lastFrame,
        headHandles: body.headHandles,
        tailHandles: body.tailHandles,
        frameRate: body.frameRate ?? (isFrameRate(show.frameRate) ? show.frameRate : '24'),
        plateWidth: body.plateWidth,
        plateHeight: body.plateHeight,
        pixelAspect: body.pixelAspect,
        assigneeId: body.assigneeId ?? null,
        dueDate: body.dueDate ?? null,
        status: body.status,
        sourceTimecodeIn: checkSourceTimecode(body.sourceTimecodeIn ?? null, body.frameRate ?? showRate(show)),
        plateFirstFrame: body.plateFirstFrame ?? null,
      });
    id = Number(res.insertId);
  } catch (e) {
    if (isDuplicateKey(e)) throw shotCodeTaken(body.code);
    throw e;
  }
  await touchShow(body.showId);
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'shot.create', targetType: 'shot', targetId: id, detail: { code: body.code, showId: body.showId } });
  return getShot(access, id);
}

/** Returns the source timecode normalised at the rate (';' for drop frame), or a 422 naming the field when that label does not exist. */
function checkSourceTimecode(tc: string | null, rate: string): string | null {
  if (tc === null) return null;
  try {
    return framesToTimecode(timecodeToFrames(tc, rate), rate);
  } catch (e) {
    const message = e instanceof TimecodeError ? e.message : 'is not a timecode';
    throw new HttpError('validation_failed', `sourceTimecodeIn: ${message}`, { sourceTimecodeIn: message });
  }
}

/** Marks the show as changed, so "recently updated" shows surface shot work. */
async function touchShow(showId: number) {
  await db().update(shows).set({ updatedAt: new Date() }).where(eq(shows.id, showId));
}

export async function updateShot(access: StudioAccess, shotId: number, body: ShotPatch) {
  const before = await getShotRow(access, shotId);
  const first = body.firstFrame ?? before.firstFrame;
  const last = body.lastFrame ?? before.lastFrame;
  if (last < first) {
    throw new HttpError('validation_failed', `lastFrame: must not be before the cut in (${first})`, { lastFrame: `must not be before the cut in (${first})` });
  }
  if (body.assigneeId !== undefined) await checkAssignee(access.studioId, body.assigneeId);
  if (body.sourceTimecodeIn !== undefined || body.frameRate !== undefined) {
    const tc = checkSourceTimecode(body.sourceTimecodeIn !== undefined ? body.sourceTimecodeIn : before.sourceTimecodeIn, body.frameRate ?? before.frameRate);
    if (body.sourceTimecodeIn !== undefined) body = { ...body, sourceTimecodeIn: tc };
  }
  if (body.code !== undefined && body.code !== before.code) {
    const [taken] = await db()
      .select({ id: shots.id })
      .from(shots)
      .where(and(eq(shots.showId, before.showId), eq(shots.code, body.code), ne(shots.id, shotId)));
    if (taken) throw shotCodeTaken(body.code);
  }
  const changes = Object.fromEntries(Object.entries(body).filter(([, v]) => v !== undefined)) as Partial<typeof shots.$inferInsert>;
  // A tail never stored apart follows the head: keep its count when only the head changes.
  if (changes.headHandles !== undefined && changes.tailHandles === undefined) changes.tailHandles = before.tailHandles;
  try {
    await db()
      .update(shots)
      .set(changes)
      .where(and(eq(shots.id, shotId), eq(shots.studioId, access.studioId)));
  } catch (e) {
    if (isDuplicateKey(e)) throw shotCodeTaken(body.code ?? '');
    throw e;
  }
  await touchShow(before.showId);
  const detail: Record<string, unknown> = {};
  for (const k of Object.keys(changes)) detail[k] = { from: (before as Record<string, unknown>)[k], to: (changes as Record<string, unknown>)[k] };
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'shot.update', targetType: 'shot', targetId: shotId, detail });
  return getShot(access, shotId);
}

/** Inline table edit of status and/or assignee (artists too). Returns the updated table row. */
export async function updateShotWorkflow(access: StudioAccess, shotId: number, body: { status?: ShotStatus; assigneeId?: string | null }) {
  const before = await getShotRow(access, shotId);
  if (body.assigneeId !== undefined) await checkAssignee(access.studioId, body.assigneeId);
  const changes: Partial<typeof shots.$inferInsert> = {};
  if (body.status !== undefined) changes.status = body.status;
  if (body.assigneeId !== undefined) changes.assigneeId = body.assigneeId;
  await db()
    .update(shots)
    .set(changes)
    .where(and(eq(shots.id, shotId), eq(shots.studioId, access.studioId)));
  const detail: Record<string, unknown> = {};
  if (body.status !== undefined) detail.status = { from: before.status, to: body.status };
  if (body.assigneeId !== undefined) detail.assigneeId = { from: before.assigneeId, to: body.assigneeId };
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'shot.workflow', targetType: 'shot', targetId: shotId, detail });
  return (await withThumbnailUrls(access.studioId, [await getShotRow(access, shotId)]))[0];
}

/** Sets one status on many shots in one transaction; all of them must be in the studio (else 404, nothing changes). */
export async function bulkSetStatus(access: StudioAccess, ids: number[], status: ShotStatus) {
  const changed = await db().transaction(async (tx) => {
    const rows = await tx
      .select({ id: shots.id, status: shots.status, showId: shots.showId })
      .from(shots)
      .where(and(eq(shots.studioId, access.studioId), inArray(shots.id, ids)))
      .for('update');
    if (rows.length !== ids.length) {
      const found = new Set(rows.map((r) => r.id));
      const missing = ids.filter((id) => !found.has(id));
      throw new HttpError('not_found', `No such shot: ${missing.join(', ')}`, { ids: `unknown shot ids: ${missing.join(', ')}` });
    }
    await tx
      .update(shots)
      .set({ status })
      .where(and(eq(shots.studioId, access.studioId), inArray(shots.id, ids)));
    return rows;
  });
  await audit({
    studioId: access.studioId,
    actorId: access.userId,
    action: 'shot.bulk_status',
    // The shots are named in the detail's JSON array (every one of them); a target id column cannot hold a list.
    targetType: 'shot',
    targetId: undefined,
    detail: { status, shots: changed.map((r) => ({ id: r.id, from: r.status })) },
  });
  return { updated: changed.length, status, ids };
}

export async function setShotArchived(access: StudioAccess, shotId: number, archived: boolean) {
  const before = await getShotRow(access, shotId);
  await db()
    .update(shots)
    .set({ archivedAt: archived ? new Date() : null })
    .where(and(eq(shots.id, shotId), eq(shots.studioId, access.studioId)));
  await touchShow(before.showId);
  await audit({ studioId: access.studioId, actorId: access.userId, action: archived ? 'shot.archive' : 'shot.unarchive', targetType: 'shot', targetId: shotId });
  return (await withThumbnailUrls(access.studioId, [await getShotRow(access, shotId)]))[0];
}

// ── Imports ──────────────────────────────────────────────────────────────────────────────────────────────────────

function showRate(show: { frameRate: string }): FrameRate {
  return isFrameRate(show.frameRate) ? show.frameRate : '24';
}

function summary(p: ImportPreview) {
  return { create: p.create.length, update: p.update.length, unchanged: p.unchanged.length, errors: p.errors.length, skipped: p.skipped.length, approvedChanges: p.update.filter((u) => u.approved).length };
}

/** The shot columns an import keeps from the edit (source timecode of the cut in, record in/out, reel, clip name). */
function sourceColumns(source: ShotSource | undefined) {
  return {
    sourceTimecodeIn: source?.sourceIn ?? null,
    recordIn: source?.recordIn ?? null,
    recordOut: source?.recordOut ?? null,
    reel: source?.reel ? source.reel.slice(0, 64) : null,
    clipName: source?.clipName ? source.clipName.slice(0, 255) : null,
  };
}

/** The studio's handle convention (owner setting): where its first frame number falls. */
export async function handleConventionOf(studioId: number): Promise<HandleConvention> {
  const [row] = await db().select({ c: studios.handleConvention }).from(studios).where(eq(studios.id, studioId));
  return row?.c ?? 'head-handle';
}

/** Sets the studio's handle convention (owner only); shots already made keep their frame numbers. */
export async function setHandleConvention(access: StudioAccess, convention: HandleConvention) {
  if (access.role !== 'owner') throw new HttpError('forbidden', 'Only the studio owner can change the handle convention');
  await db().update(studios).set({ handleConvention: convention }).where(eq(studios.id, access.studioId));
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'studio.handle_convention', targetType: 'studio', targetId: access.studioId, detail: { convention } });
  return { handleConvention: convention };
}

/** What an import compares a show's shots by: code, cut range, head and tail handles. */
function existingShotColumns() {
  return {
    id: shots.id,
    code: shots.code,
    firstFrame: shots.firstFrame,
    lastFrame: shots.lastFrame,
    headHandles: shots.headHandles,
    tailHandles: tailHandlesColumn(),
    // Approved: by its status, or by an approved version (a range change on it needs an explicit tick). The outer
    // shot's id is named with its table: drizzle writes `${shots.id}` as a bare `id` in a one-table select, which
    // inside the subquery means the version's own id (every shot then read as approved once any approved version's
    // id equalled its shot's id).
    approved: sql<boolean>`(${shots.status} = 'approved' OR EXISTS (SELECT 1 FROM versions av WHERE av.shot_id = ${sql.identifier('shots')}.${sql.identifier('id')} AND av.review_state = 'approved'))`.mapWith((v) => Number(v) === 1),
  };
}

/** Previews an import into a show; writes nothing. Existing shots (archived ones too) are matched by code. */
export async function previewShowImport(access: StudioAccess, showId: number, body: ImportBody) {
  const show = await getShowRow(access, showId);
  const existing = await db()
    .select(existingShotColumns())
    .from(shots)
    .where(and(eq(shots.showId, showId), eq(shots.studioId, access.studioId)));
  const preview = previewText(body.format, body.text, showRate(show), existing, { ...body.options, convention: await handleConventionOf(access.studioId) });
  return { frameRate: show.frameRate, ...preview, summary: summary(preview) };
}

/**
 * Applies an import in one transaction: the show row is locked, its shots read again and the preview recomputed,
 * so a confirm never acts on a stale preview. Refuses (422, with the errors by line) when lines have errors,
 * unless skipErrors is set.
 */
export async function confirmShowImport(access: StudioAccess, showId: number, body: ImportBody) {
  const result = await db().transaction(async (tx) => {
    const [show] = await tx
      .select({ id: shows.id, frameRate: shows.frameRate, archivedAt: shows.archivedAt })
      .from(shows)
      .where(and(eq(shows.id, showId), eq(shows.studioId, access.studioId)))
      .for('update');
    if (!show) throw new HttpError('not_found', 'No such show');
    if (show.archivedAt) throw new HttpError('conflict', 'This show is archived: unarchive it before importing shots');
    const existing = await tx
      .select(existingShotColumns())
      .from(shots)
      .where(and(eq(shots.showId, showId), eq(shots.studioId, access.studioId)))
      .for('update');
    const preview = previewText(body.format, body.text, showRate(show), existing, { ...body.options, convention: await handleConventionOf(access.studioId) });
    if (preview.errors.length && !body.skipErrors) {
      throw new HttpError(
        'unprocessable',
        `${preview.errors.length} line${preview.errors.length > 1 ? 's' : ''} could not be read (first: line ${preview.errors[0].line}: ${preview.errors[0].message}). Fix them, or confirm with skipErrors to import the rest.`,
        undefined,
        { lines: preview.errors },
      );
    }
    // A range change on an approved shot is applied only when ticked; the others are kept as they are and listed.
    const ticked = new Set(body.confirmApproved);
    const kept = preview.update.filter((u) => u.approved && !ticked.has(u.id));
    preview.update = preview.update.filter((u) => !u.approved || ticked.has(u.id));
    if (!preview.create.length && !preview.update.length) return { preview, kept, created: [] as { id: number; code: string }[] };
    const created: { id: number; code: string }[] = [];
    for (const s of preview.create) {
      const [res] = await tx.insert(shots).values({
        studioId: access.studioId,
        showId,
        code: s.code,
        description: s.description,
        firstFrame: s.firstFrame,
        lastFrame: s.lastFrame,
        headHandles: s.headHandles,
        tailHandles: s.tailHandles,
        frameRate: showRate(show),
        ...sourceColumns(s.source),
      });
      created.push({ id: Number(res.insertId), code: s.code });
    }
    for (const u of preview.update) {
      await tx
        .update(shots)
        .set({ firstFrame: u.to.first, lastFrame: u.to.last, headHandles: u.to.headHandles, tailHandles: u.to.tailHandles, ...(u.source ? sourceColumns(u.source) : {}) })
        .where(and(eq(shots.id, u.id), eq(shots.studioId, access.studioId)));
    }
    await tx.update(shows).set({ updatedAt: new Date() }).where(eq(shows.id, showId));
    return { preview, kept, created };
  });
  const { preview, kept, created } = result;
  // each new shot's activity starts with where it came from
  for (const c of created) {
    await audit({ studioId: access.studioId, actorId: access.userId, action: 'shot.create', targetType: 'shot', targetId: c.id, detail: { code: c.code, showId, importedFrom: body.format } });
  }
  await audit({
    studioId: access.studioId,
    actorId: access.userId,
    action: 'shot.import',
    targetType: 'show',
    targetId: showId,
    detail: { format: body.format, ...summary(preview), updated: preview.update.map((u) => ({ code: u.code, from: u.from, to: u.to, approved: u.approved })), kept: kept.map((u) => u.code) },
  });
  return {
    created,
    updated: preview.update,
    /** Approved shots whose range change was not ticked: left as they were. */
    kept,
    unchanged: preview.unchanged,
    skipped: preview.skipped,
    errors: preview.errors,
    summary: summary(preview),
  };
}

// ── People ───────────────────────────────────────────────────────────────────────────────────────────────────────

/** Members who can be assigned shots (artists, supervisors, owners), by name. */
export async function listAssignablePeople(studioId: number) {
  return db()
    .select({ userId: users.id, name: users.name, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.studioId, studioId), ne(memberships.role, 'client')))
    .orderBy(asc(users.name), asc(users.id));
}
