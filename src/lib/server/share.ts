// Share links: a supervisor opens a version (or one of its exports) to people outside the studio until a date, with an
// optional password. The link carries a 160-bit token; only its SHA-256 is stored, so a lookup is by hash and an
// unknown or malformed token always gets the same answer. The public side sees the slate facts, the media and a
// comment box that files a client note, and nothing else of the studio (no ids, no internal notes, no e-mails).
import { createHash, timingSafeEqual } from 'node:crypto';
import { and, desc, eq, sql } from 'drizzle-orm';
import type { AstroCookies } from 'astro';
import { db } from './db';
import { assets, notes, shareLinkRecipients, shareLinks, shots, shows, studios, users, versions } from './db/schema';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { audit } from './audit';
import { hashToken, newToken } from './tokens';
import { hashPassword, verifyPassword } from './password';
import { sendMail } from './mail';
import { config } from './config';
import { RULES, forgive, recordAttempt, throttled } from './throttle';
import { presignGet } from './storage';
import { exportFileNameOf, readyExportOf } from './exports';
import { clipOf } from './versions';
import { CAUTION } from '../export/layout';
import { versionLabel } from '../vocab';
import { availableClientSteps } from '../review/states';
import { clientSignOffView } from './client-signoff';
import { tellStudioOfClientNotes } from './client-notes';
import type { ShareCreateBody } from '../export/schemas';
import { rangeWithHandles } from '../library/handles';
import { propPicturesOf } from './prop-pictures';

type LinkRow = typeof shareLinks.$inferSelect;
type VersionRow = typeof versions.$inferSelect;

const MEDIA_SECONDS = 900;

export const shareUrl = (token: string) => `${config.appUrl}/share/${token}`;

export type LinkStatus = 'active' | 'expired' | 'revoked';
export const linkStatus = (l: Pick<LinkRow, 'expiresAt' | 'revokedAt'>, now = new Date()): LinkStatus =>
  l.revokedAt ? 'revoked' : l.expiresAt.getTime() <= now.getTime() ? 'expired' : 'active';

// ── Studio side ──────────────────────────────────────────────────────────────────────────────────────────────────

/** Creates a link to a baked version (or a ready export of it); e-mails it when `email` is given. */
export async function createShareLink(access: StudioAccess, version: VersionRow, body: ShareCreateBody) {
  if (version.bakeState !== 'baked') throw new HttpError('conflict', 'Only a baked version can be shared: bake it first', undefined, { bakeState: version.bakeState });
  let exportAssetId: number | null = null;
  if (body.exportAssetId) {
    const exp = await readyExportOf(access.studioId, version.id, body.exportAssetId);
    if (!exp) throw new HttpError('validation_failed', 'exportAssetId: is not a stored export of this version', { exportAssetId: 'is not a stored export of this version' });
    exportAssetId = exp.id;
  }
  const token = newToken();
  const passwordHash = body.password ? await hashPassword(body.password) : null;
  const [res] = await db().insert(shareLinks).values({
    studioId: access.studioId,
    versionId: version.id,
    exportAssetId,
    tokenHash: hashToken(token),
    passwordHash,
    expiresAt: body.expiresAt,
    createdBy: access.userId,
  });
  const linkId = Number(res.insertId);
  await audit({
    studioId: access.studioId,
    actorId: access.userId,
    action: 'share.create',
    targetType: 'share_link',
    targetId: linkId,
    detail: { versionId: version.id, exportAssetId, expiresAt: body.expiresAt.toISOString(), password: !!passwordHash },
  });
  const url = shareUrl(token);
  if (body.email) await mailLink(access, linkId, url, body.email, body.message);
  const [link] = await shareLinkViews(access.studioId, { linkId });
  return { link, url, token, emailedTo: body.email || null };
}

async function mailLink(access: StudioAccess, linkId: number, url: string, to: string, message?: string) {
  const [row] = await db()
    .select({ link: shareLinks, studio: studios.name, shot: shots.code, number: versions.number, sender: users.name })
    .from(shareLinks)
    .innerJoin(studios, eq(studios.id, shareLinks.studioId))
    .innerJoin(versions, eq(versions.id, shareLinks.versionId))
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .leftJoin(users, eq(users.id, access.userId))
    .where(eq(shareLinks.id, linkId));
  const until = row.link.expiresAt.toISOString().slice(0, 10);
  await sendMail({
    to,
    subject: `${row.studio}: ${row.shot} ${versionLabel(row.number)} to review`,
    paragraphs: [
      `${row.sender ?? 'Someone'} at ${row.studio} shared a previs of ${row.shot} ${versionLabel(row.number)} with you. It plays in the browser; no account is needed.`,
      ...(message ? [message] : []),
      `The link works until ${until}${row.link.passwordHash ? ' and asks for the password the studio gave you' : ''}.`,
      CAUTION,
    ],
    action: { label: 'Open the preview', url },
  });
  // the address is kept: a client account with it (now or later) finds the version in its home (access.ts)
  await db()
    .insert(shareLinkRecipients)
    .values({ studioId: access.studioId, shareLinkId: linkId, email: to.trim().toLowerCase() })
    .onDuplicateKeyUpdate({ set: { email: to.trim().toLowerCase() } });
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'share.email', targetType: 'share_link', targetId: linkId, detail: { to } });
}

async function linkRow(access: StudioAccess, linkId: number): Promise<LinkRow> {
  const [row] = await db()
    .select()
    .from(shareLinks)
    .where(and(eq(shareLinks.id, linkId), eq(shareLinks.studioId, access.studioId)));
  if (!row) throw new HttpError('not_found', 'No such share link');
  return row;
}

/** The studio of a share link (for authorization), or 404. */
export async function shareLinkStudio(linkId: number): Promise<number> {
  const [row] = await db().select({ studioId: shareLinks.studioId }).from(shareLinks).where(eq(shareLinks.id, linkId));
  if (!row) throw new HttpError('not_found', 'No such share link');
  return row.studioId;
}

/** Turns a link off at once (idempotent). */
export async function revokeShareLink(access: StudioAccess, linkId: number) {
  const row = await linkRow(access, linkId);
  if (!row.revokedAt) {
    await db().update(shareLinks).set({ revokedAt: new Date() }).where(eq(shareLinks.id, row.id));
    await audit({ studioId: access.studioId, actorId: access.userId, action: 'share.revoke', targetType: 'share_link', targetId: row.id });
  }
  const [link] = await shareLinkViews(access.studioId, { linkId });
  return link;
}

/** E-mails an active link again; the caller proves it holds the token (we keep only its hash). */
export async function sendShareLink(access: StudioAccess, linkId: number, body: { token: string; email: string; message?: string }) {
  const row = await linkRow(access, linkId);
  if (!sameHash(hashToken(body.token), row.tokenHash)) throw new HttpError('validation_failed', 'token: is not this link’s token', { token: 'is not this link’s token' });
  const status = linkStatus(row);
  if (status !== 'active') throw new HttpError('conflict', status === 'revoked' ? 'This link is turned off' : 'This link has expired');
  await mailLink(access, row.id, shareUrl(body.token), body.email, body.message);
  return { sentTo: body.email };
}

/** Links of a version (or one link) for the studio, newest first: status, opens, password, export, who made it. */
export async function shareLinkViews(studioId: number, where: { versionId?: number; linkId?: number }) {
  const rows = await db()
    .select({ link: shareLinks, createdByName: users.name, exportFormat: assets.format })
    .from(shareLinks)
    .leftJoin(users, eq(users.id, shareLinks.createdBy))
    .leftJoin(assets, eq(assets.id, shareLinks.exportAssetId))
    .where(
      and(
        eq(shareLinks.studioId, studioId),
        where.versionId !== undefined ? eq(shareLinks.versionId, where.versionId) : undefined,
        where.linkId !== undefined ? eq(shareLinks.id, where.linkId) : undefined,
      ),
    )
    .orderBy(desc(shareLinks.createdAt), desc(shareLinks.id));
  return rows.map(({ link, createdByName, exportFormat }) => ({
    id: link.id,
    versionId: link.versionId,
    exportAssetId: link.exportAssetId,
    exportFormat: exportFormat ?? null,
    hasPassword: !!link.passwordHash,
    expiresAt: link.expiresAt,
    revokedAt: link.revokedAt,
    openCount: link.openCount,
    status: linkStatus(link),
    createdAt: link.createdAt,
    createdBy: createdByName ?? null,
  }));
}

// ── Public side (by token) ───────────────────────────────────────────────────────────────────────────────────────

const TOKEN_SHAPE = /^[a-z2-7]{32}$/;

function sameHash(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/** One answer for every token that opens nothing we know of: malformed, unknown, or of a deleted version. */
export const NOT_FOUND_MESSAGE = 'This link does not open anything. Check that it was copied whole, or ask the studio for a new one.';
const notFound = () => new HttpError('not_found', NOT_FOUND_MESSAGE);

export interface OpenedShare {
  link: LinkRow;
  version: VersionRow;
}

/** Finds the link of a token by its hash; 404 (always the same) when none, 410 when expired or turned off. */
export async function findShare(token: string): Promise<OpenedShare> {
  // Hash even a malformed token, so the answer takes the same path and time.
  const hash = hashToken(String(token ?? '').slice(0, 64));
  const [row] = await db()
    .select({ link: shareLinks, version: versions })
    .from(shareLinks)
    .innerJoin(versions, eq(versions.id, shareLinks.versionId))
    .where(eq(shareLinks.tokenHash, hash));
  if (!row || !TOKEN_SHAPE.test(token)) throw notFound();
  const status = linkStatus(row.link);
  if (status === 'revoked') throw new HttpError('gone', 'The studio has turned this link off. Ask them for a new one if you still need it.', undefined, { reason: 'revoked' });
  if (status === 'expired') throw new HttpError('gone', `This link expired on ${row.link.expiresAt.toISOString().slice(0, 10)}. Ask the studio for a new one if you still need it.`, undefined, { reason: 'expired' });
  return row;
}

// Password: checked with Argon2id; a success leaves an HttpOnly cookie so the page and its API calls stay open.

export const unlockCookieName = (link: LinkRow) => `tm_share_${link.tokenHash.slice(0, 16)}`;
/** The cookie's value: derived from the salted password hash, so it cannot be made without the database. */
const unlockValue = (link: LinkRow) => createHash('sha256').update(`tidemark-share-unlock:${link.tokenHash}:${link.passwordHash}`).digest('hex');

export function isUnlocked(link: LinkRow, cookies: AstroCookies): boolean {
  if (!link.passwordHash) return true;
  const value = cookies.get(unlockCookieName(link))?.value;
  return !!value && sameHash(value, unlockValue(link));
}

/**
 * Checks a password from the client at `address`; sets the unlock cookie on success; 401 when wrong, 429 while the
 * link or the address must wait (counted in the database: every app server and restart sees the same count).
 */
export async function unlockShare(opened: OpenedShare, password: string, cookies: AstroCookies, path: string, address: string): Promise<void> {
  const { link } = opened;
  if (!link.passwordHash) return;
  const perLink = { rule: RULES.sharePasswordLink, key: `link:${link.id}` };
  const attempt = await recordAttempt([perLink, { rule: RULES.sharePasswordAddress, key: address }]);
  if (!attempt.allowed) throw throttled(attempt, 'Too many wrong passwords for this link');
  if (!(await verifyPassword(link.passwordHash, password))) {
    throw new HttpError('unauthenticated', 'That password is not right for this link.', { password: 'is not right' }, { passwordRequired: true });
  }
  await forgive(attempt, [perLink]);
  cookies.set(unlockCookieName(link), unlockValue(link), {
    path,
    httpOnly: true,
    sameSite: 'lax',
    secure: config.secureCookies,
    expires: new Date(Math.min(link.expiresAt.getTime(), Date.now() + 12 * 3600_000)),
  });
}

/** 401 unless the link has no password or this browser unlocked it. */
export function requireUnlocked(opened: OpenedShare, cookies: AstroCookies) {
  if (!isUnlocked(opened.link, cookies)) {
    throw new HttpError('unauthenticated', 'This link is protected by a password.', undefined, { passwordRequired: true });
  }
}

/** Counts one open of the link. */
export async function countOpen(link: LinkRow): Promise<number> {
  await db()
    .update(shareLinks)
    .set({ openCount: sql`${shareLinks.openCount} + 1` })
    .where(eq(shareLinks.id, link.id));
  return link.openCount + 1;
}

/** What the public page shows: the slate facts and the media kind. No ids, no e-mails, no notes. */
export async function publicShareInfo(opened: OpenedShare) {
  const { link, version } = opened;
  const [row] = await db()
    .select({ studio: studios.name, show: shows.name, showCode: shows.code, shot: shots, artist: users.name })
    .from(versions)
    .innerJoin(studios, eq(studios.id, versions.studioId))
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .innerJoin(shows, eq(shows.id, shots.showId))
    .leftJoin(users, eq(users.id, versions.authorId))
    .where(eq(versions.id, version.id));
  if (!row) throw notFound();
  const scene = (typeof version.scene === 'string' ? JSON.parse(version.scene) : version.scene) as { timing?: { startFrame?: number; endFrame?: number } };
  let media: { kind: 'version' } | { kind: 'export'; format: string } = { kind: 'version' };
  if (link.exportAssetId) {
    const exp = await readyExportOf(link.studioId, version.id, link.exportAssetId);
    if (exp) media = { kind: 'export', format: exp.format ?? 'mp4' };
  }
  return {
    studio: row.studio,
    show: row.show,
    showCode: row.showCode,
    shot: row.shot.code,
    version: versionLabel(version.number),
    versionNumber: version.number,
    artist: row.artist ?? null,
    reviewState: version.reviewState,
    // the client's sign-off through this link, and the decisions a guest may take now
    ...clientSignOffView(version),
    clientSteps: availableClientSteps('guest', version.reviewState, version.clientState),
    frameRate: row.shot.frameRate,
    sourceTimecodeIn: row.shot.sourceTimecodeIn,
    shotRange: { first: row.shot.firstFrame, last: row.shot.lastFrame },
    bakedRange: { first: scene.timing?.startFrame ?? row.shot.firstFrame, last: scene.timing?.endFrame ?? row.shot.lastFrame },
    createdAt: version.createdAt.toISOString(),
    expiresAt: link.expiresAt.toISOString(),
    media,
    caution: CAUTION,
  };
}
export type PublicShareInfo = Awaited<ReturnType<typeof publicShareInfo>>;

/** Short-lived URLs of what the link plays: the export file, or the clip (+ stats) with the plate. */
export async function publicShareMedia(opened: OpenedShare) {
  const { link, version } = opened;
  if (link.exportAssetId) {
    const exp = await readyExportOf(link.studioId, version.id, link.exportAssetId);
    if (exp) {
      return {
        kind: 'export' as const,
        format: exp.format,
        contentType: exp.contentType,
        width: exp.width,
        height: exp.height,
        url: await presignGet(exp.storageKey, MEDIA_SECONDS),
        downloadUrl: await presignGet(exp.storageKey, MEDIA_SECONDS, exportFileNameOf(exp)),
        expiresInSeconds: MEDIA_SECONDS,
      };
    }
  }
  const clip = version.bakeState === 'baked' ? await clipOf(version) : null;
  if (!clip) throw new HttpError('conflict', 'This preview is not ready to play yet. Try again later.');
  const meta = (typeof clip.meta === 'string' ? JSON.parse(clip.meta) : clip.meta ?? {}) as Record<string, unknown>;
  const [shot] = await db().select().from(shots).where(eq(shots.id, version.shotId));
  let plate: { url: string; contentType: string; width: number | null; height: number | null } | null = null;
  if (version.plateAssetId) {
    const [p] = await db().select().from(assets).where(and(eq(assets.id, version.plateAssetId), eq(assets.studioId, link.studioId)));
    const pm = (p && (typeof p.meta === 'string' ? JSON.parse(p.meta) : p.meta)) as { state?: string } | null;
    if (p && pm?.state === 'ready') plate = { url: await presignGet(p.storageKey, MEDIA_SECONDS), contentType: p.contentType, width: p.width, height: p.height };
  }
  return {
    kind: 'clip' as const,
    clipUrl: await presignGet(clip.storageKey, MEDIA_SECONDS),
    statsUrl: typeof meta.statsKey === 'string' ? await presignGet(meta.statsKey, MEDIA_SECONDS) : null,
    plate,
    propPictures: await propPicturesOf(version, MEDIA_SECONDS),
    plateSize: { width: shot.plateWidth, height: shot.plateHeight },
    metresPerPixel: shot.metresPerPixel,
    firstFrame: shot.firstFrame,
    plateFirstFrame: shot.plateFirstFrame,
    expiresInSeconds: MEDIA_SECONDS,
  };
}

/** Files the viewer's comment as a client note on the version (guest name, not internal) at a frame. */
export async function addGuestNote(opened: OpenedShare, body: { name: string; body: string; frame: number }) {
  const { link, version } = opened;
  const [shot] = await db().select().from(shots).where(eq(shots.id, version.shotId));
  const scene = (typeof version.scene === 'string' ? JSON.parse(version.scene) : version.scene) as { timing?: { startFrame?: number; endFrame?: number } };
  const withHandles = rangeWithHandles(shot);
  const lo = Math.min(withHandles.first, scene.timing?.startFrame ?? shot.firstFrame);
  const hi = Math.max(withHandles.last, scene.timing?.endFrame ?? shot.lastFrame);
  if (body.frame < lo || body.frame > hi) throw new HttpError('validation_failed', `frame: must be between ${lo} and ${hi}`, { frame: `must be between ${lo} and ${hi}` });
  const [res] = await db().insert(notes).values({
    studioId: link.studioId,
    versionId: version.id,
    guestName: body.name,
    frame: body.frame,
    body: body.body,
    internal: false,
    clientSource: 'share link',
  });
  tellStudioOfClientNotes(version.id);
  // filed under the version (the note's id in the detail), so the shot's activity lists the comment
  await audit({ studioId: link.studioId, actorId: null, action: 'share.note', targetType: 'version', targetId: version.id, detail: { noteId: Number(res.insertId), shareLinkId: link.id, guestName: body.name, frame: body.frame } });
  return { name: body.name, body: body.body, frame: body.frame, createdAt: new Date().toISOString() };
}
