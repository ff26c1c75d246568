// Prop pictures: a cut-out photo of the product (PNG or WebP with alpha) that a prop is drawn as instead of its fill
// colour (the scene's `props[].picture`). Uploaded like a plate — a pending asset, a presigned POST bound to the
// declared size, the checks of checkArrivedUpload on completion, housekeeping purging uploads never completed — plus
// an alpha channel, bounded dimensions and the object's SHA-256. A picture belongs to the studio: artists and up
// list and choose them; a client sees one only through a version shared with them (propPicturesOf).
import { randomBytes } from 'node:crypto';
import { and, desc, eq, inArray, sql } from 'drizzle-orm';
import { imageSize } from 'image-size';
import { db } from './db';
import { assets, type versions } from './db/schema';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { audit } from './audit';
import { objectDigest, presignGet, presignPost, uploadKey } from './storage';
import { checkArrivedUpload, tooLarge, UPLOAD_SECONDS, type PendingMeta } from './plates';
import { declaresAlpha } from './picture-header';
import { PICTURE_LIMITS, type PictureUploadBody } from '../library/schemas';
import type { Scene } from '../scene';
import type { PropPictureRef } from '../render/prop-pictures';

const VIEW_SECONDS = 900;
const EXTENSION: Record<string, string> = { 'image/png': 'png', 'image/webp': 'webp' };

/** A ready picture as the API describes it. */
export interface PictureInfo {
  id: number;
  fileName: string;
  contentType: string;
  width: number;
  height: number;
  byteSize: number;
  sha256: string | null;
  createdAt: Date;
}

const metaOf = (a: typeof assets.$inferSelect) => (typeof a.meta === 'string' ? JSON.parse(a.meta) : a.meta) as PendingMeta | null;
const describe = (a: typeof assets.$inferSelect): PictureInfo => ({
  id: a.id,
  fileName: metaOf(a)?.fileName ?? `picture-${a.id}`,
  contentType: a.contentType,
  width: a.width ?? 0,
  height: a.height ?? 0,
  byteSize: a.byteSize,
  sha256: a.sha256,
  createdAt: a.createdAt,
});

/**
 * Starts a picture upload: refuses an oversize declaration (413) before anything is stored or signed, records a
 * pending asset and returns a presigned POST form whose policy allows 1…byteSize bytes of that type.
 */
export async function startPictureUpload(access: StudioAccess, body: PictureUploadBody) {
  if (body.byteSize > PICTURE_LIMITS.bytes) throw tooLarge('A prop picture', PICTURE_LIMITS.bytes);
  // The form writes under uploads/ only; completion copies the file to its final key and checks that copy.
  const storageKey = uploadKey(access.studioId, randomBytes(12).toString('hex'), EXTENSION[body.contentType]!);
  const meta: PendingMeta = { state: 'pending', fileName: body.fileName, declaredSize: body.byteSize };
  const [res] = await db().insert(assets).values({
    studioId: access.studioId,
    kind: 'picture',
    storageKey,
    contentType: body.contentType,
    byteSize: body.byteSize,
    meta,
    createdBy: access.userId,
  });
  const assetId = Number(res.insertId);
  const post = await presignPost(storageKey, body.contentType, body.byteSize, UPLOAD_SECONDS);
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'picture.upload_start', targetType: 'asset', targetId: assetId, detail: { fileName: body.fileName, byteSize: body.byteSize } });
  return { assetId, upload: { url: post.url, method: 'POST' as const, fields: post.fields, maxBytes: body.byteSize, expiresInSeconds: UPLOAD_SECONDS } };
}

async function pictureRow(access: StudioAccess, assetId: number) {
  const [row] = await db()
    .select()
    .from(assets)
    .where(and(eq(assets.id, assetId), eq(assets.studioId, access.studioId), eq(assets.kind, 'picture')));
  if (!row) throw new HttpError('not_found', 'No such prop picture');
  return row;
}

/**
 * Finishes a picture upload: the checks every upload gets (checkArrivedUpload: arrived, size, type by magic bytes),
 * then an alpha channel and dimensions within PICTURE_LIMITS (else 422 naming `file`, the object deleted); records
 * the size, dimensions and SHA-256 and marks it ready.
 */
export async function completePictureUpload(access: StudioAccess, assetId: number) {
  const asset = await pictureRow(access, assetId);
  const meta = metaOf(asset);
  if (meta?.state !== 'pending') throw new HttpError('conflict', 'This upload is already complete');
  const { storageKey, size, bytes, detected, refuse } = await checkArrivedUpload(access, asset, meta, {
    finalKey: `studios/${access.studioId}/pictures/${randomBytes(12).toString('hex')}.${EXTENSION[asset.contentType] ?? 'bin'}`,
    limit: PICTURE_LIMITS.bytes,
    accepted: 'a PNG or WebP image. Save the cut-out as PNG or WebP with transparency.',
    sameType: (declared, real) => declared === real,
  });
  const alpha = declaresAlpha(bytes);
  if (!alpha) {
    throw await refuse(
      new HttpError('unprocessable', `"${meta.fileName}" has no transparency: a prop picture is a cut-out, so save it as PNG or WebP with an alpha channel`, {
        file: 'has no alpha channel',
      }),
    );
  }
  let width = 0, height = 0;
  try {
    const dims = imageSize(bytes);
    width = dims.width ?? 0;
    height = dims.height ?? 0;
  } catch {
    /* refused below */
  }
  if (!width || !height) throw await refuse(new HttpError('unprocessable', `Could not read the width and height of "${meta.fileName}": the image header is damaged`, { file: 'unreadable image header' }));
  const { maxSide, minSide } = PICTURE_LIMITS;
  if (width > maxSide || height > maxSide || width < minSide || height < minSide) {
    throw await refuse(
      new HttpError('unprocessable', `"${meta.fileName}" is ${width} × ${height} pixels: a prop picture must be ${minSide} to ${maxSide} pixels on each side`, {
        file: `must be ${minSide}–${maxSide} pixels on each side (is ${width} × ${height})`,
      }),
    );
  }
  const { sha256 } = await objectDigest(storageKey);
  const ready: PendingMeta = { ...meta, state: 'ready' };
  await db().update(assets).set({ byteSize: size, width, height, format: detected.ext, sha256, meta: ready }).where(eq(assets.id, asset.id));
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'picture.ready', targetType: 'asset', targetId: asset.id, detail: { type: detected.mime, width, height, byteSize: size, sha256 } });
  return { picture: describe({ ...asset, storageKey, byteSize: size, width, height, sha256, meta: ready }) };
}

/** The studio's ready prop pictures, newest first, each with a short-lived URL (artists and up choose from these). */
export async function listPictures(access: StudioAccess) {
  const rows = await db()
    .select()
    .from(assets)
    .where(and(eq(assets.studioId, access.studioId), eq(assets.kind, 'picture'), sql`JSON_VALUE(${assets.meta}, '$.state') = 'ready'`))
    .orderBy(desc(assets.id))
    .limit(200);
  return {
    pictures: await Promise.all(rows.map(async (a) => ({ ...describe(a), url: await presignGet(a.storageKey, VIEW_SECONDS) }))),
    expiresInSeconds: VIEW_SECONDS,
  };
}

/** One prop's picture as a viewer loads it: the prop's id, a short-lived URL and the picture's size in pixels. */
export type PropPictureUrl = PropPictureRef;

/**
 * The pictures a version's props are drawn as, with short-lived URLs. The caller has already loaded the version
 * under its access rule (versionAccess, or a share link), so a client gets exactly the pictures of a version shared
 * with them; only ready pictures of the version's own studio are named (an id of another studio's is ignored).
 */
export async function propPicturesOf(version: Pick<typeof versions.$inferSelect, 'studioId' | 'scene'>, seconds = VIEW_SECONDS): Promise<PropPictureUrl[]> {
  const props = ((version.scene as Partial<Scene> | null)?.props ?? []).filter((p): p is Scene['props'][number] & { picture: number } => typeof p?.picture === 'number');
  if (props.length === 0) return [];
  const ids = [...new Set(props.map((p) => p.picture))];
  const rows = await db()
    .select()
    .from(assets)
    .where(and(eq(assets.studioId, version.studioId), eq(assets.kind, 'picture'), inArray(assets.id, ids)));
  const ready = new Map(rows.filter((a) => metaOf(a)?.state === 'ready').map((a) => [a.id, a]));
  const urls = new Map<number, string>();
  for (const a of ready.values()) urls.set(a.id, await presignGet(a.storageKey, seconds));
  return props.flatMap((p) => {
    const a = ready.get(p.picture);
    return a ? [{ propId: p.id, pictureId: a.id, url: urls.get(a.id)!, width: a.width ?? 0, height: a.height ?? 0 }] : [];
  });
}
