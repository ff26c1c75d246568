// PATCH /api/notes/:noteId {resolved: boolean} → {note}: resolves or reopens a note thread (artist+).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { noteAccess } from '~/lib/server/access';
import { setNoteResolved } from '~/lib/server/review';
import { notePatch } from '~/lib/review/notes';

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const { note, access } = await noteAccess(locals, idParam(params, 'noteId'), 'artist');
  const body = await readJson(request, notePatch);
  return json({ note: await setNoteResolved(access, note, body.resolved) });
});
