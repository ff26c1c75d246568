// A shot's activity: its own audit entries (details, plate, scale, workflow, assignment) and those of its versions
// (saved, baked, submitted, returned, approved, client sign-off, exports, share links), newest first, each with the
// version's number so the screen can say "v003 approved" (words in src/lib/review/activity.ts).
import { and, desc, eq, inArray, ne, or, sql, type SQL } from 'drizzle-orm';
import { db } from './db';
import { assets, auditLog, reviewEvents, shareLinks, users, versions } from './db/schema';
import { clientVersionIds } from './access';
import type { StudioAccess } from './authz';
import { getShotRow } from './library';
import { ACTIVITY_ACTIONS } from '../review/activity';

/** The shot's activity, newest first (at most `limit` entries): `{id, action, actorName, detail, versionNumber, createdAt}`. */
export async function listShotActivity(access: StudioAccess, shotId: number, limit = 200) {
  await getShotRow(access, shotId);
  const versionRows = await db()
    .select({ id: versions.id, number: versions.number })
    .from(versions)
    .where(and(eq(versions.shotId, shotId), eq(versions.studioId, access.studioId)));
  const numberOf = new Map(versionRows.map((v) => [v.id, v.number]));
  const versionIds = versionRows.map((v) => v.id);
  const [links, exportsOf] = versionIds.length
    ? await Promise.all([
        db().select({ id: shareLinks.id, versionId: shareLinks.versionId }).from(shareLinks).where(inArray(shareLinks.versionId, versionIds)),
        db().select({ id: assets.id, versionId: assets.versionId }).from(assets).where(and(eq(assets.kind, 'export'), inArray(assets.versionId, versionIds))),
      ])
    : [[], []];
  const linkVersion = new Map(links.map((l) => [String(l.id), l.versionId]));
  const exportVersion = new Map(exportsOf.map((a) => [String(a.id), a.versionId as number]));
  const id = String(shotId);
  const targets: SQL[] = [
    and(eq(auditLog.targetType, 'shot'), eq(auditLog.targetId, id))!,
    and(eq(auditLog.action, 'shot.bulk_status'), sql`JSON_CONTAINS(${auditLog.detail}, ${JSON.stringify({ id: shotId })}, '$.shots')`)!,
  ];
  if (versionIds.length) targets.push(and(eq(auditLog.targetType, 'version'), inArray(auditLog.targetId, versionIds.map(String)))!);
  if (links.length) targets.push(and(eq(auditLog.targetType, 'share_link'), inArray(auditLog.targetId, [...linkVersion.keys()]))!);
  if (exportsOf.length) targets.push(and(eq(auditLog.targetType, 'asset'), inArray(auditLog.targetId, [...exportVersion.keys()]))!);
  const rows = await db()
    .select({ id: auditLog.id, action: auditLog.action, actorName: users.name, targetType: auditLog.targetType, targetId: auditLog.targetId, detail: auditLog.detail, createdAt: auditLog.createdAt })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(and(eq(auditLog.studioId, access.studioId), inArray(auditLog.action, [...ACTIVITY_ACTIONS]), or(...targets)))
    .orderBy(desc(auditLog.createdAt), desc(auditLog.id))
    .limit(limit);
  // an assignment names people by id: the activity says their names
  const people = new Set<string>();
  const parsed = rows.map((r) => ({ ...r, detail: (typeof r.detail === 'string' ? JSON.parse(r.detail) : r.detail) as Record<string, any> | null }));
  for (const r of parsed) if (r.action === 'shot.workflow' && r.detail?.assigneeId) for (const u of [r.detail.assigneeId.from, r.detail.assigneeId.to]) if (typeof u === 'string') people.add(u);
  const names = new Map(
    people.size ? (await db().select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, [...people]))).map((u) => [u.id, u.name]) : [],
  );
  return parsed.map((r) => {
    if (r.action === 'shot.workflow' && r.detail?.assigneeId) {
      const a = r.detail.assigneeId as { from?: string | null; to?: string | null };
      r.detail = { ...r.detail, assigneeName: { from: a.from ? (names.get(a.from) ?? null) : null, to: a.to ? (names.get(a.to) ?? null) : null } };
    }
    const versionId =
      r.targetType === 'version' ? Number(r.targetId) : r.targetType === 'share_link' ? linkVersion.get(r.targetId ?? '') : r.targetType === 'asset' ? exportVersion.get(r.targetId ?? '') : undefined;
    return {
      id: r.id,
      action: r.action,
      actorName: r.actorName,
      detail: r.detail as Record<string, unknown> | null,
      versionId: versionId ?? null,
      versionNumber: versionId !== undefined ? (numberOf.get(versionId) ?? null) : null,
      createdAt: r.createdAt,
    };
  });
}

/**
 * The version of the shot a supervisor last decided on (returned or approved), other than `exceptVersionId`: the
 * default partner when comparing a version, so a resubmission is compared with what was sent back, not with a draft
 * saved in between. Null when no other version was ever decided on.
 */
export async function lastDecidedVersion(access: StudioAccess, shotId: number, exceptVersionId: number) {
  const [row] = await db()
    .select({ id: versions.id, number: versions.number, toState: reviewEvents.toState, at: reviewEvents.createdAt })
    .from(reviewEvents)
    .innerJoin(versions, eq(versions.id, reviewEvents.versionId))
    .where(
      and(
        eq(versions.shotId, shotId),
        eq(versions.studioId, access.studioId),
        ne(versions.id, exceptVersionId),
        inArray(reviewEvents.toState, ['returned', 'approved']),
        ...(access.role === 'client' ? [inArray(versions.id, clientVersionIds(access))] : []),
      ),
    )
    .orderBy(desc(reviewEvents.createdAt), desc(reviewEvents.id))
    .limit(1);
  return row ?? null;
}

/** The latest decision (returned or approved) on the version, with who made it and their words; null if none. */
export async function lastDecisionOn(access: StudioAccess, versionId: number) {
  const [row] = await db()
    .select({ toState: reviewEvents.toState, comment: reviewEvents.comment, actorName: users.name, at: reviewEvents.createdAt })
    .from(reviewEvents)
    .leftJoin(users, eq(users.id, reviewEvents.actorId))
    .where(and(eq(reviewEvents.versionId, versionId), eq(reviewEvents.studioId, access.studioId), inArray(reviewEvents.toState, ['returned', 'approved'])))
    .orderBy(desc(reviewEvents.createdAt), desc(reviewEvents.id))
    .limit(1);
  if (!row) return null;
  const client = access.role === 'client';
  return { toState: row.toState, comment: client ? null : row.comment, actorName: client ? null : row.actorName, at: row.at.toISOString() };
}
