// Plates: the browser uploads straight to the object store with a presigned POST bound to the declared size; the server checks the declared size
// first, then on completion the real size, the real type by magic bytes and a still's dimensions, and only then makes
// it the shot's current plate (versions keep the plate they were blocked on). A PNG or JPEG plate gets its thumbnail
// made here (thumbnails.ts); for video and WebP the browser draws the first frame and uploads it as kind 'thumbnail'.
// Also the plate's scale in metres.
import { randomBytes } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { fileTypeFromBuffer } from 'file-type';
import { imageSize } from 'image-size';
import { db } from './db';
import { assets, shots } from './db/schema';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { audit } from './audit';
import { deleteObject, getObject, headObject, presignGet, presignPost, putObject, uploadKey } from './storage';
import { moveToFinalKey } from './uploads';
import { getShotRow } from './library';
import { canThumbnailOnServer, makeStillThumbnail } from './thumbnails';
import { PLATE_LIMITS, STILL_TYPES, MB, type PlateUploadBody } from '../library/schemas';

/** How long a presigned upload form stays valid, seconds (plates and prop pictures). */
export const UPLOAD_SECONDS = 900;
const VIEW_SECONDS = 300;
/** Bytes read from the start of an upload to check its type and a still's dimensions (JPEG headers can be long). */
export const HEADER_BYTES = 512 * 1024;

const EXTENSION: Record<string, string> = {
  'image/png': 'png',
  'image/jpeg': 'jpg',
  'image/webp': 'webp',
  'video/mp4': 'mp4',
  'video/quicktime': 'mov',
  'video/webm': 'webm',
};
const NAMES: Record<string, string> = {
  'image/png': 'PNG image',
  'image/jpeg': 'JPEG image',
  'image/webp': 'WebP image',
  'video/mp4': 'MP4 video',
  'video/quicktime': 'QuickTime video',
  'video/webm': 'WebM video',
};

const isStill = (type: string) => (STILL_TYPES as readonly string[]).includes(type);

/** The declared-size limit in bytes for an upload of this kind and type. */
export function sizeLimit(kind: 'plate' | 'thumbnail', contentType: string): number {
  if (kind === 'thumbnail') return PLATE_LIMITS.thumbnail;
  return isStill(contentType) ? PLATE_LIMITS.still : PLATE_LIMITS.video;
}

/** 413 naming `byteSize`: `what` is larger than `limit` bytes (plates and prop pictures). */
export function tooLarge(what: string, limit: number) {
  return new HttpError('payload_too_large', `${what} is larger than the ${Math.round(limit / MB)} MB limit`, {
    byteSize: `must be at most ${limit} bytes (${Math.round(limit / MB)} MB)`,
  });
}

export interface PendingMeta {
  state: 'pending' | 'ready';
  fileName: string;
  declaredSize: number;
  durationSeconds?: number;
  /** On a thumbnail made by the server: the plate it was made from. */
  madeFromPlate?: number;
}

const thumbnailKey = (studioId: number, shotId: number) => `studios/${studioId}/shots/${shotId}/thumbnails/${randomBytes(12).toString('hex')}.png`;

/**
 * Makes and stores the thumbnail of a PNG or JPEG plate; null for other types, or when the plate cannot be decoded
 * here (too large, unusual encoding): the browser then makes one. Never fails the plate itself.
 */
async function makePlateThumbnail(studioId: number, shotId: number, plate: { storageKey: string; contentType: string }, size: number, head: Uint8Array) {
  if (!canThumbnailOnServer(plate.contentType)) return null;
  try {
    const bytes = head.length >= size ? head : await getObject(plate.storageKey);
    const made = makeStillThumbnail(bytes, plate.contentType);
    const storageKey = thumbnailKey(studioId, shotId);
    await putObject(storageKey, made.png, 'image/png');
    return { storageKey, ...made };
  } catch (err) {
    console.warn(`thumbnail of ${plate.storageKey} not made on the server: ${(err as Error).message}`);
    return null;
  }
}

/**
 * Starts an upload: refuses an oversize declaration (413) before anything is stored or signed, records a pending
 * asset and returns a presigned POST form for the browser (its policy allows 1…byteSize bytes of that type). A
 * pending upload never completed expires: housekeeping deletes it and its object (purgeStaleUploads).
 */
export async function startPlateUpload(access: StudioAccess, shotId: number, body: PlateUploadBody) {
  const shot = await getShotRow(access, shotId);
  const limit = sizeLimit(body.kind, body.contentType);
  if (body.byteSize > limit) throw tooLarge(body.kind === 'thumbnail' ? 'A thumbnail' : isStill(body.contentType) ? 'A still plate' : 'A video plate', limit);
  // The form writes under uploads/ only; completion copies the file to its final key and checks that copy.
  const storageKey = uploadKey(access.studioId, randomBytes(12).toString('hex'), EXTENSION[body.contentType]!);
  const meta: PendingMeta = { state: 'pending', fileName: body.fileName, declaredSize: body.byteSize };
  const [res] = await db().insert(assets).values({
    studioId: access.studioId,
    kind: body.kind,
    storageKey,
    contentType: body.contentType,
    byteSize: body.byteSize,
    shotId: shot.id,
    meta,
    createdBy: access.userId,
  });
  const assetId = Number(res.insertId);
  // The form's policy lets the store take at most the declared size: the file checked on completion is that file.
  const post = await presignPost(storageKey, body.contentType, body.byteSize, UPLOAD_SECONDS);
  await audit({ studioId: access.studioId, actorId: access.userId, action: `${body.kind}.upload_start`, targetType: 'asset', targetId: assetId, detail: { shotId, fileName: body.fileName, byteSize: body.byteSize } });
  return {
    assetId,
    kind: body.kind,
    upload: { url: post.url, method: 'POST' as const, fields: post.fields, maxBytes: body.byteSize, expiresInSeconds: UPLOAD_SECONDS },
  };
}

async function assetRow(access: StudioAccess, assetId: number) {
  const [row] = await db()
    .select()
    .from(assets)
    .where(and(eq(assets.id, assetId), eq(assets.studioId, access.studioId)));
  if (!row || (row.kind !== 'plate' && row.kind !== 'thumbnail') || !row.shotId) throw new HttpError('not_found', 'No such plate');
  return row;
}

/** The same family: browsers and cameras label ISO media files loosely (.mov holding MP4, .m4v). */
function sameFamily(declared: string, real: string): boolean {
  if (declared === real) return true;
  const iso = ['video/mp4', 'video/quicktime', 'video/x-m4v'];
  return iso.includes(declared) && iso.includes(real);
}

/** What an upload's first bytes turned out to be, and how to refuse it (the object and row deleted, audited). */
export interface ArrivedUpload {
  /** The final key the upload was moved to and checked at (the form cannot write there). */
  storageKey: string;
  size: number;
  /** The first HEADER_BYTES (or all) of the object. */
  bytes: Uint8Array;
  detected: { ext: string; mime: string };
  refuse: (err: HttpError) => Promise<HttpError>;
}

/**
 * The checks every upload to a presigned form gets on completion (plates, thumbnails, prop pictures): the object has
 * arrived, is not larger than the kind's `limit` nor than declared, is not empty, and its magic bytes are a type that
 * `sameType` accepts for the declared one. A refused upload's object and row are deleted (422 / 413 naming the field).
 */
export async function checkArrivedUpload(
  access: StudioAccess,
  asset: typeof assets.$inferSelect,
  meta: PendingMeta,
  rule: { finalKey: string; limit: number; accepted: string; sameType: (declared: string, real: string) => boolean },
): Promise<ArrivedUpload> {
  const kind = asset.kind;
  if (!(await headObject(asset.storageKey))) throw new HttpError('conflict', 'No file has arrived for this upload yet: send it to the upload form first');
  // What is checked from here on is the copy at the final key: the form cannot write there.
  const storageKey = await moveToFinalKey(asset.id, asset.storageKey, rule.finalKey);
  const head = await headObject(storageKey);
  if (!head) throw new HttpError('conflict', 'No file has arrived for this upload yet: send it to the upload form first');

  const refuse = async (err: HttpError) => {
    await deleteObject(storageKey).catch(() => undefined);
    await db().delete(assets).where(eq(assets.id, asset.id));
    await audit({ studioId: access.studioId, actorId: access.userId, action: `${kind}.refused`, targetType: 'asset', targetId: asset.id, detail: { reason: err.message } });
    return err;
  };

  const limit = rule.limit;
  if (head.size > limit) throw await refuse(tooLarge(`"${meta.fileName}"`, limit));
  // A store that does not enforce the form's content-length-range still cannot slip a larger file past the check.
  if (head.size > meta.declaredSize) {
    throw await refuse(new HttpError('payload_too_large', `"${meta.fileName}" is ${head.size} bytes, more than the ${meta.declaredSize} declared`, { byteSize: `the file sent is larger than the ${meta.declaredSize} bytes declared` }));
  }
  if (head.size === 0) throw await refuse(new HttpError('unprocessable', `"${meta.fileName}" is empty`));

  const bytes = await getObject(storageKey, [0, Math.min(head.size, HEADER_BYTES) - 1]);
  const detected = await fileTypeFromBuffer(bytes);
  const declaredName = NAMES[asset.contentType] ?? asset.contentType;
  if (!detected) {
    throw await refuse(
      new HttpError('unprocessable', `"${meta.fileName}" is not a ${declaredName}: its content is not ${rule.accepted}`, { file: 'content does not match its type' }),
    );
  }
  if (!rule.sameType(asset.contentType, detected.mime)) {
    throw await refuse(
      new HttpError(
        'unprocessable',
        `"${meta.fileName}" was sent as a ${declaredName}, but its content is ${NAMES[detected.mime] ? `a ${NAMES[detected.mime]}` : `${detected.mime}`}. Send it with its real type, or export it again.`,
        { file: 'content does not match its type' },
      ),
    );
  }
  return { storageKey, size: head.size, bytes, detected, refuse };
}

/**
 * Finishes an upload: checks that the object exists, its real size, its real type by magic bytes (a mismatch is
 * refused with 422 and the object deleted) and a still's dimensions; then makes it the shot's current plate
 * (or thumbnail). A video's width and height come from the browser's video element (`measured`).
 */
export async function completePlateUpload(
  access: StudioAccess,
  assetId: number,
  measured: { width?: number; height?: number; durationSeconds?: number },
) {
  const asset = await assetRow(access, assetId);
  const meta = (typeof asset.meta === 'string' ? JSON.parse(asset.meta) : asset.meta) as PendingMeta;
  if (meta?.state !== 'pending') throw new HttpError('conflict', 'This upload is already complete');
  await getShotRow(access, asset.shotId!);
  const kind = asset.kind as 'plate' | 'thumbnail';
  const { storageKey, size: arrivedSize, bytes, detected, refuse } = await checkArrivedUpload(access, asset, meta, {
    finalKey: `studios/${access.studioId}/shots/${asset.shotId}/${kind}s/${randomBytes(12).toString('hex')}.${EXTENSION[asset.contentType] ?? 'bin'}`,
    limit: sizeLimit(kind, asset.contentType),
    accepted: 'any image or video type Tidemark accepts (PNG, JPEG, WebP, MP4, QuickTime, WebM). Export the plate again in one of those.',
    sameType: sameFamily,
  });
  const head = { size: arrivedSize };

  let width: number | null = null;
  let height: number | null = null;
  if (isStill(asset.contentType)) {
    try {
      const size = imageSize(bytes);
      width = size.width ?? null;
      height = size.height ?? null;
    } catch {
      /* refused below */
    }
    if (!width || !height) {
      throw await refuse(new HttpError('unprocessable', `Could not read the width and height of "${meta.fileName}": the image header is damaged`, { file: 'unreadable image header' }));
    }
  } else {
    width = measured.width ?? null;
    height = measured.height ?? null;
  }

  // A new plate brings its own thumbnail (made here for PNG and JPEG; for other types the browser sends one next).
  const thumb = kind === 'plate' ? await makePlateThumbnail(access.studioId, asset.shotId!, { storageKey, contentType: asset.contentType }, head.size, bytes) : null;
  const ready: PendingMeta = { ...meta, state: 'ready', ...(measured.durationSeconds ? { durationSeconds: measured.durationSeconds } : {}) };
  const thumbnailId = await db().transaction(async (tx) => {
    await tx
      .update(assets)
      .set({ byteSize: head.size, width, height, format: detected.ext, meta: ready })
      .where(eq(assets.id, asset.id));
    let thumbId: number | null = null;
    if (thumb) {
      const thumbMeta: PendingMeta = { state: 'ready', fileName: `${meta.fileName.replace(/\.[^.]*$/, '')}-thumbnail.png`, declaredSize: thumb.png.length, madeFromPlate: asset.id };
      const [res] = await tx.insert(assets).values({
        studioId: access.studioId,
        kind: 'thumbnail',
        storageKey: thumb.storageKey,
        contentType: 'image/png',
        byteSize: thumb.png.length,
        width: thumb.width,
        height: thumb.height,
        format: 'png',
        shotId: asset.shotId!,
        meta: thumbMeta,
        createdBy: access.userId,
      });
      thumbId = Number(res.insertId);
    }
    // Replacing the plate replaces the thumbnail: the old plate's picture must not stand for the new one.
    const shotChange: Partial<typeof shots.$inferInsert> =
      kind === 'plate'
        ? { plateAssetId: asset.id, thumbnailAssetId: thumbId, ...(width && height ? { plateWidth: width, plateHeight: height } : {}) }
        : { thumbnailAssetId: asset.id };
    await tx
      .update(shots)
      .set(shotChange)
      .where(and(eq(shots.id, asset.shotId!), eq(shots.studioId, access.studioId)));
    return thumbId;
  });
  await audit({
    studioId: access.studioId,
    actorId: access.userId,
    action: `${kind}.set`,
    targetType: 'shot',
    targetId: asset.shotId!,
    detail: { assetId: asset.id, type: detected.mime, width, height, byteSize: head.size, ...(thumbnailId ? { thumbnailAssetId: thumbnailId } : {}) },
  });
  return {
    asset: { id: asset.id, kind, shotId: asset.shotId!, contentType: asset.contentType, format: detected.ext, byteSize: head.size, width, height },
    /** The thumbnail made from this plate; null when the browser must make it (video, WebP, or a still not decoded here). */
    thumbnail: thumb && thumbnailId ? { id: thumbnailId, width: thumb.width, height: thumb.height } : null,
  };
}

/** A short-lived URL to view a ready plate or thumbnail (old versions' plates too), with its description. */
export async function plateViewUrl(access: StudioAccess, assetId: number) {
  const asset = await assetRow(access, assetId);
  await getShotRow(access, asset.shotId!); // clients: only plates of shows shared with them
  const meta = (typeof asset.meta === 'string' ? JSON.parse(asset.meta) : asset.meta) as PendingMeta | null;
  if (meta?.state !== 'ready') throw new HttpError('not_found', 'This plate has not finished uploading');
  return {
    asset: {
      id: asset.id,
      kind: asset.kind,
      shotId: asset.shotId,
      contentType: asset.contentType,
      format: asset.format,
      byteSize: asset.byteSize,
      width: asset.width,
      height: asset.height,
      durationSeconds: meta.durationSeconds ?? null,
      createdAt: asset.createdAt,
    },
    url: await presignGet(asset.storageKey, VIEW_SECONDS),
    expiresInSeconds: VIEW_SECONDS,
  };
}

/** Stores the plate's scale: metres per plate pixel from a drawn line of `pixels` length and its real `metres`. */
export async function setShotScale(access: StudioAccess, shotId: number, line: { pixels: number; metres: number }) {
  const shot = await getShotRow(access, shotId);
  const metresPerPixel = line.metres / line.pixels;
  await db()
    .update(shots)
    .set({ metresPerPixel })
    .where(and(eq(shots.id, shot.id), eq(shots.studioId, access.studioId)));
  await audit({
    studioId: access.studioId,
    actorId: access.userId,
    action: 'shot.scale',
    targetType: 'shot',
    targetId: shotId,
    detail: { from: shot.metresPerPixel, to: metresPerPixel, pixels: line.pixels, metres: line.metres, plateAssetId: shot.plateAssetId },
  });
  return { shotId, metresPerPixel, plateAssetId: shot.plateAssetId };
}
