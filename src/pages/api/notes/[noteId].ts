// PATCH /api/notes/:noteId {resolved: boolean} → {note}: resolves or reopens a note thread (artist+).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { noteFor, setNoteResolved } from '~/lib/server/review';
import { notePatch } from '~/lib/review/notes';

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const { note, access } = await noteFor(locals, idParam(params, 'noteId'), 'artist');
  const body = await readJson(request, notePatch);
  return json({ note: await setNoteResolved(access, note, body.resolved) });
});
