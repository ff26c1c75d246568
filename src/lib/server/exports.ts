// Stored exports: the browser renders and encodes, asks for a presigned POST form (its policy binds the key, the type
// and the declared size), uploads straight to the object store, then asks us to complete: we check the object's real
// size and its type by magic bytes before listing it on the
// version with who made it, when, its format and size, and a presigned download link named for the file.
import { randomBytes } from 'node:crypto';
import { and, desc, eq, inArray } from 'drizzle-orm';
import { db } from './db';
import { assets, shareLinks, users, versions } from './db/schema';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { audit } from './audit';
import { deleteObject, getObject, headObject, presignGet, presignPost, uploadKey } from './storage';
import { moveToFinalKey } from './uploads';
import { FORMAT_EXTENSIONS, FORMAT_TYPES, type ExportFormat } from '../export/layout';
import { MAX_EXPORT_BYTES, MB, type ExportStartBody } from '../export/schemas';

const UPLOAD_SECONDS = 900;
const DOWNLOAD_SECONDS = 900;

interface ExportMeta {
  state: 'pending' | 'ready';
  fileName: string;
  declaredSize: number;
  options: ExportStartBody['options'];
  /** What to do when a ready export of the version has the same file name (numbered when left out). */
  sameName?: 'number' | 'replace';
}

type VersionRow = typeof versions.$inferSelect;
type AssetRow = typeof assets.$inferSelect;

const metaOf = (a: AssetRow) => (typeof a.meta === 'string' ? JSON.parse(a.meta) : a.meta) as ExportMeta | null;

/** True when the first bytes are those of the format: GIF87a/GIF89a, an ISO BMFF 'ftyp' box, a ZIP local header. */
export function magicMatches(format: ExportFormat, head: Uint8Array): boolean {
  const ascii = (from: number, to: number) => String.fromCharCode(...head.subarray(from, to));
  if (format === 'gif') return ascii(0, 6) === 'GIF89a' || ascii(0, 6) === 'GIF87a';
  if (format === 'mp4') return ascii(4, 8) === 'ftyp';
  return head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 && head[3] === 0x04;
}

/**
 * Records a pending export of a baked version and returns a presigned POST form for the browser: the store takes
 * exactly one object, at this key, of the format's type and of 1…byteSize bytes (the size zod checked above). A
 * pending export never completed expires: housekeeping deletes it and its object (purgeStaleUploads).
 */
export async function startExport(access: StudioAccess, version: VersionRow, body: ExportStartBody) {
  if (version.bakeState !== 'baked') throw new HttpError('conflict', 'Only a baked version can be exported: bake it first', undefined, { bakeState: version.bakeState });
  if (body.byteSize > MAX_EXPORT_BYTES) {
    throw new HttpError('payload_too_large', `An export is larger than the ${MAX_EXPORT_BYTES / MB} MB limit: choose a smaller size or fewer frames`, {
      byteSize: `must be at most ${MAX_EXPORT_BYTES} bytes`,
    });
  }
  const ext = FORMAT_EXTENSIONS[body.format];
  if (!body.fileName.toLowerCase().endsWith(`.${ext}`)) throw new HttpError('validation_failed', `fileName: must end with .${ext}`, { fileName: `must end with .${ext}` });
  const contentType = FORMAT_TYPES[body.format];
  // The form writes under uploads/ only; completion copies the file to its final key and checks that copy.
  const storageKey = uploadKey(access.studioId, randomBytes(12).toString('hex'), ext);
  const meta: ExportMeta = { state: 'pending', fileName: body.fileName, declaredSize: body.byteSize, options: body.options, sameName: body.sameName ?? 'number' };
  const [res] = await db().insert(assets).values({
    studioId: access.studioId,
    kind: 'export',
    storageKey,
    contentType,
    byteSize: body.byteSize,
    width: body.options.width,
    height: body.options.height,
    versionId: version.id,
    shotId: version.shotId,
    format: body.format,
    meta,
    createdBy: access.userId,
  });
  const assetId = Number(res.insertId);
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'export.start', targetType: 'asset', targetId: assetId, detail: { versionId: version.id, format: body.format, byteSize: body.byteSize } });
  const post = await presignPost(storageKey, contentType, body.byteSize, UPLOAD_SECONDS);
  return {
    assetId,
    upload: { url: post.url, method: 'POST' as const, fields: post.fields, maxBytes: body.byteSize, expiresInSeconds: UPLOAD_SECONDS },
  };
}

async function exportRow(studioId: number, assetId: number, versionId?: number): Promise<AssetRow> {
  const [row] = await db()
    .select()
    .from(assets)
    .where(and(eq(assets.id, assetId), eq(assets.studioId, studioId), eq(assets.kind, 'export')));
  if (!row || (versionId !== undefined && row.versionId !== versionId)) throw new HttpError('not_found', 'No such export');
  return row;
}

/** Checks the uploaded object (present, the declared size, the format's magic bytes) and lists the export. */
export async function completeExport(access: StudioAccess, version: VersionRow, assetId: number) {
  const asset = await exportRow(access.studioId, assetId, version.id);
  const meta = metaOf(asset);
  if (meta?.state !== 'pending') throw new HttpError('conflict', 'This export is already complete');
  if (!(await headObject(asset.storageKey))) throw new HttpError('conflict', 'No file has arrived for this export yet: send it with the upload form first');
  const format = asset.format as ExportFormat;
  // What is checked from here on is the copy at the final key: the form cannot write there.
  const storageKey = await moveToFinalKey(asset.id, asset.storageKey, `studios/${access.studioId}/versions/${version.id}/exports/${randomBytes(12).toString('hex')}.${FORMAT_EXTENSIONS[format]}`);
  const head = await headObject(storageKey);
  if (!head) throw new HttpError('conflict', 'No file has arrived for this export yet: send it with the upload form first');
  const refuse = async (message: string, fields: Record<string, string>) => {
    await deleteObject(storageKey).catch(() => undefined);
    await db().delete(assets).where(eq(assets.id, asset.id));
    await audit({ studioId: access.studioId, actorId: access.userId, action: 'export.refused', targetType: 'asset', targetId: asset.id, detail: { reason: message } });
    return new HttpError('unprocessable', message, fields);
  };
  if (head.size !== meta.declaredSize) throw await refuse(`The stored file is ${head.size} bytes, not the ${meta.declaredSize} declared: export again`, { byteSize: 'does not match the uploaded file' });
  const first = await getObject(storageKey, [0, Math.min(head.size, 16) - 1]);
  if (!magicMatches(format, first)) throw await refuse(`The uploaded file is not a ${FORMAT_EXTENSIONS[format].toUpperCase()} file`, { file: `content is not ${FORMAT_EXTENSIONS[format].toUpperCase()}` });
  const { fileName, replaced } = await settleFileName(access, version.id, asset, meta);
  await db()
    .update(assets)
    .set({ byteSize: head.size, meta: { ...meta, fileName, state: 'ready' } })
    .where(eq(assets.id, asset.id));
  if (replaced.length) await removeReplaced(access, asset.id, replaced);
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'export.create', targetType: 'asset', targetId: asset.id, detail: { versionId: version.id, format, byteSize: head.size } });
  const [view] = await exportViews(access.studioId, { assetId: asset.id });
  return view;
}

/** `SHOT_v003_1001-1040.mp4` → `SHOT_v003_1001-1040-2.mp4` (n ≥ 2). */
export function numberedFileName(fileName: string, n: number): string {
  const dot = fileName.lastIndexOf('.');
  return dot > 0 ? `${fileName.slice(0, dot)}-${n}${fileName.slice(dot)}` : `${fileName}-${n}`;
}

/**
 * A re-export of a version under a file name one of its ready exports already has: 'number' gives it the first free
 * numbered name (…-2.mp4, …-3.mp4); 'replace' keeps the name and returns the earlier exports of that name to remove.
 */
async function settleFileName(access: StudioAccess, versionId: number, asset: AssetRow, meta: ExportMeta): Promise<{ fileName: string; replaced: AssetRow[] }> {
  const others = (await db().select().from(assets).where(and(eq(assets.studioId, access.studioId), eq(assets.kind, 'export'), eq(assets.versionId, versionId)))).filter(
    (a) => a.id !== asset.id && metaOf(a)?.state === 'ready',
  );
  const taken = new Set(others.map((a) => metaOf(a)!.fileName));
  if (!taken.has(meta.fileName)) return { fileName: meta.fileName, replaced: [] };
  if (meta.sameName === 'replace') return { fileName: meta.fileName, replaced: others.filter((a) => metaOf(a)!.fileName === meta.fileName) };
  let n = 2;
  while (taken.has(numberedFileName(meta.fileName, n))) n++;
  return { fileName: numberedFileName(meta.fileName, n), replaced: [] };
}

/** Removes exports a re-export replaced; share links that pointed at them now point at the new one. */
async function removeReplaced(access: StudioAccess, newId: number, replaced: AssetRow[]) {
  const ids = replaced.map((a) => a.id);
  await db().update(shareLinks).set({ exportAssetId: newId }).where(and(eq(shareLinks.studioId, access.studioId), inArray(shareLinks.exportAssetId, ids)));
  await db().delete(assets).where(and(eq(assets.studioId, access.studioId), inArray(assets.id, ids)));
  for (const a of replaced) await deleteObject(a.storageKey).catch(() => undefined);
  await audit({ studioId: access.studioId, actorId: access.userId, action: 'export.replace', targetType: 'asset', targetId: newId, detail: { replaced: ids } });
}

/** Ready exports of a version (or one export), newest first, each with a download link named for its file. */
export async function exportViews(studioId: number, where: { versionId?: number; assetId?: number }) {
  const rows = await db()
    .select({ asset: assets, authorName: users.name })
    .from(assets)
    .leftJoin(users, eq(users.id, assets.createdBy))
    .where(
      and(
        eq(assets.studioId, studioId),
        eq(assets.kind, 'export'),
        where.versionId !== undefined ? eq(assets.versionId, where.versionId) : undefined,
        where.assetId !== undefined ? eq(assets.id, where.assetId) : undefined,
      ),
    )
    .orderBy(desc(assets.createdAt), desc(assets.id));
  const ready = rows.filter((r) => metaOf(r.asset)?.state === 'ready');
  return Promise.all(
    ready.map(async ({ asset, authorName }) => {
      const meta = metaOf(asset)!;
      return {
        id: asset.id,
        versionId: asset.versionId,
        format: asset.format as ExportFormat,
        contentType: asset.contentType,
        byteSize: asset.byteSize,
        width: asset.width,
        height: asset.height,
        fileName: meta.fileName,
        options: meta.options,
        createdAt: asset.createdAt,
        createdBy: authorName ?? null,
        downloadUrl: await presignGet(asset.storageKey, DOWNLOAD_SECONDS, meta.fileName),
        expiresInSeconds: DOWNLOAD_SECONDS,
      };
    }),
  );
}

/** One ready export of the studio (404 otherwise). */
export async function exportFor(studioId: number, assetId: number) {
  const [view] = await exportViews(studioId, { assetId });
  if (!view) throw new HttpError('not_found', 'No such export');
  return view;
}

/** The studio of an export asset (for authorization), or 404. */
export async function exportStudio(assetId: number): Promise<number> {
  const [row] = await db().select({ studioId: assets.studioId, kind: assets.kind }).from(assets).where(eq(assets.id, assetId));
  if (!row || row.kind !== 'export') throw new HttpError('not_found', 'No such export');
  return row.studioId;
}

/** The stored export row of a version for a share link, when ready (used by share.ts). */
export async function readyExportOf(studioId: number, versionId: number, assetId: number): Promise<AssetRow | null> {
  const [row] = await db()
    .select()
    .from(assets)
    .where(and(eq(assets.id, assetId), eq(assets.studioId, studioId), eq(assets.kind, 'export'), eq(assets.versionId, versionId)));
  return row && metaOf(row)?.state === 'ready' ? row : null;
}

export const exportFileNameOf = (a: AssetRow) => metaOf(a)?.fileName ?? `export.${FORMAT_EXTENSIONS[a.format as ExportFormat] ?? a.format}`;
