// Frame-pinned notes: the input schema shared by the composer and the API, and small pure helpers.
// Points are plate-normalised: x and y from 0 to 1, origin at the image's top-left corner, y down (as drawn).
import { z } from 'zod';

export const NOTE_LIMITS = { maxBody: 5000, maxStrokePoints: 500 } as const;

const unit = z.number({ invalid_type_error: 'must be a number' }).finite('must be a finite number').min(0, 'must be between 0 and 1').max(1, 'must be between 0 and 1');
export const notePoint = z.object({ x: unit, y: unit }).strict();
export type NotePoint = z.infer<typeof notePoint>;

export const noteCreate = z
  .object({
    body: z.string({ required_error: 'is required', invalid_type_error: 'must be text' }).trim().min(1, 'must not be empty').max(NOTE_LIMITS.maxBody, `is too long (${NOTE_LIMITS.maxBody} characters at most)`),
    /** The frame the note is pinned to; a reply takes its parent's frame when this is left out. */
    frame: z.number({ invalid_type_error: 'must be a number' }).int('must be a whole frame number').optional(),
    point: notePoint.nullish(),
    stroke: z
      .array(notePoint)
      .min(2, 'needs at least 2 points')
      .max(NOTE_LIMITS.maxStrokePoints, `has too many points (${NOTE_LIMITS.maxStrokePoints} at most)`)
      .nullish(),
    /** Internal notes are for the studio only; a client's notes are never internal. Staff notes default to internal. */
    internal: z.boolean({ invalid_type_error: 'must be true or false' }).optional(),
    parentId: z.number({ invalid_type_error: 'must be a note id' }).int().positive('must be a note id').nullish(),
  })
  .strict();
export type NoteCreate = z.infer<typeof noteCreate>;

export const notePatch = z.object({ resolved: z.boolean({ required_error: 'is required', invalid_type_error: 'must be true or false' }) }).strict();

/** A note as the API answers it. */
export interface NoteView {
  id: number;
  versionId: number;
  versionNumber?: number;
  parentId: number | null;
  frame: number;
  point: NotePoint | null;
  stroke: NotePoint[] | null;
  body: string;
  internal: boolean;
  /** `guest`: written by a share-link viewer under the name they typed. */
  author: { id: string | null; name: string; guest?: boolean };
  resolvedAt: string | null;
  resolvedBy: string | null;
  createdAt: string;
}

/** A timeline marker: one per top-level note (replies ride along with their parent). */
export interface NoteMarker {
  noteId: number;
  frame: number;
  resolved: boolean;
  internal: boolean;
  point: NotePoint | null;
  stroke: NotePoint[] | null;
}

/** Markers for the timeline, ordered by frame then age. */
export function markersOf(notes: NoteView[]): NoteMarker[] {
  return notes
    .filter((n) => n.parentId === null)
    .map((n) => ({ noteId: n.id, frame: n.frame, resolved: n.resolvedAt !== null, internal: n.internal, point: n.point, stroke: n.stroke }))
    .sort((a, b) => a.frame - b.frame || a.noteId - b.noteId);
}

/** Groups notes into threads: each top-level note with its replies (oldest first), threads ordered by frame. */
export function threadsOf(notes: NoteView[]): { note: NoteView; replies: NoteView[] }[] {
  const replies = new Map<number, NoteView[]>();
  for (const n of notes) if (n.parentId !== null) replies.set(n.parentId, [...(replies.get(n.parentId) ?? []), n]);
  return notes
    .filter((n) => n.parentId === null)
    .sort((a, b) => a.frame - b.frame || a.id - b.id)
    .map((note) => ({ note, replies: (replies.get(note.id) ?? []).sort((a, b) => a.id - b.id) }));
}
