// Unsaved work kept in the browser per shot (localStorage), offered back when the artist returns.
import type { EditorDoc } from './document';

export interface StoredDraft {
  scene: EditorDoc;
  /** When it was kept, ms since the epoch. */
  savedAt: number;
  /** The version the editing started from (null: a new scene). */
  baseVersionId: number | null;
}

export const draftKey = (shotId: number) => `tidemark:editor-draft:shot-${shotId}`;

type StorageLike = Pick<Storage, 'getItem' | 'setItem' | 'removeItem'>;

export function keepDraft(storage: StorageLike, shotId: number, draft: StoredDraft): void {
  try { storage.setItem(draftKey(shotId), JSON.stringify(draft)); } catch { /* full or disabled: the draft is a convenience */ }
}

export function readDraft(storage: StorageLike, shotId: number): StoredDraft | null {
  try {
    const raw = storage.getItem(draftKey(shotId));
    if (!raw) return null;
    const d = JSON.parse(raw) as StoredDraft;
    return d && typeof d === 'object' && d.scene && typeof d.savedAt === 'number' ? d : null;
  } catch {
    return null;
  }
}

export function dropDraft(storage: StorageLike, shotId: number): void {
  try { storage.removeItem(draftKey(shotId)); } catch { /* ignore */ }
}
