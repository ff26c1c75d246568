// Browser uploads after the form: the file the form wrote under uploads/ is copied to its final key before it is
// checked, so the form (valid 15 minutes) can never replace what was checked; stray objects under uploads/ (a form
// used again after completion) are swept by housekeeping.
import { eq } from 'drizzle-orm';
import { db } from './db';
import { assets } from './db/schema';
import { HttpError } from './http';
import { copyObject, deleteObject, keysOlderThan, UPLOADS_PREFIX } from './storage';

/**
 * Moves a pending upload from where the form wrote it to `finalKey` (a store-side copy; the row follows, still
 * pending, so housekeeping finds it if the check never finishes) and returns the key to check and keep. A pending
 * row from before uploads/ existed keeps its key.
 */
export async function moveToFinalKey(assetId: number, uploadedKey: string, finalKey: string): Promise<string> {
  if (!uploadedKey.startsWith(UPLOADS_PREFIX)) return uploadedKey;
  try {
    await copyObject(uploadedKey, finalKey);
  } catch (err: any) {
    if (err?.name === 'NoSuchKey' || err?.$metadata?.httpStatusCode === 404) throw new HttpError('conflict', 'No file has arrived for this upload yet: send it to the upload form first');
    throw err;
  }
  await db().update(assets).set({ storageKey: finalKey }).where(eq(assets.id, assetId));
  await deleteObject(uploadedKey).catch(() => undefined);
  return finalKey;
}

/**
 * Deletes objects under `prefix` (uploads/, or one studio's part of it) last written before `before`; returns how
 * many. Run with the pending-upload retention: by then no pending row points there, and a completed one never does.
 */
export async function sweepUploadPrefix(before: Date, prefix = UPLOADS_PREFIX): Promise<number> {
  if (!prefix.startsWith(UPLOADS_PREFIX)) throw new Error(`sweepUploadPrefix sweeps only under ${UPLOADS_PREFIX}`);
  let swept = 0;
  for (const key of await keysOlderThan(prefix, before)) {
    try {
      await deleteObject(key);
      swept++;
    } catch (err) {
      console.error(`[housekeeping] could not delete stray upload ${key}: ${err instanceof Error ? err.message : err}`);
    }
  }
  return swept;
}
