// POST /api/shared/:token/notes {name, body, frame} → 201 {note}: the viewer's comment, filed as a client note on the
// version (guest name, not internal). Public (same refusals as GET /api/shared/:token).
import { endpoint, json, readJson, PUBLIC_FORM_BYTES } from '~/lib/server/http';
import { addGuestNote, findShare, requireUnlocked } from '~/lib/server/share';
import { guestNoteBody } from '~/lib/export/schemas';

export const POST = endpoint(async ({ params, cookies, request }) => {
  const body = await readJson(request, guestNoteBody, PUBLIC_FORM_BYTES);
  const opened = await findShare(params.token ?? '');
  requireUnlocked(opened, cookies);
  return json({ note: await addGuestNote(opened, body) }, 201);
});
