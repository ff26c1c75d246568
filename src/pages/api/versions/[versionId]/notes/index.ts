// GET /api/versions/:versionId/notes[?carried=1] → {notes, carried?}: the version's notes ordered by frame (replies carry
// parentId), and with carried=1 the still-open notes of the shot's earlier versions. Reading marks them read.
// POST {body, frame, point?, stroke?, internal?, parentId?} → 201 {note}. Any member who may see the version;
// clients never see or write internal notes.
import { z } from 'zod';
import { versionAccess } from '~/lib/server/access';
import { endpoint, json, idParam, readJson, readQuery } from '~/lib/server/http';
import { carriedNotes, createNote, listNotes, markNotesRead } from '~/lib/server/review';
import { noteCreate } from '~/lib/review/notes';

const Query = z.object({ carried: z.enum(['0', '1'], { errorMap: () => ({ message: 'must be 0 or 1' }) }).optional() }).strict();

export const GET = endpoint(async ({ params, locals, url }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'client');
  const query = readQuery(url, Query);
  const [notes, carried] = await Promise.all([listNotes(access, version.id), query.carried === '1' ? carriedNotes(access, version) : Promise.resolve(undefined)]);
  await markNotesRead(access, version.id);
  return json({ notes, ...(carried ? { carried } : {}) });
});

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, shot, access } = await versionAccess(locals, idParam(params, 'versionId'), 'client');
  const body = await readJson(request, noteCreate, 100_000);
  return json({ note: await createNote(access, version, shot, body) }, 201);
});
