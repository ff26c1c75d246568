// POST /api/shared/:token/notes {name, body, frame} → 201 {note}: the viewer's comment, filed as a client note on the
// version (guest name, not internal). Public (same refusals as GET /api/shared/:token); throttled per link and per
// address (429 past RULES.guestNoteLink / guestNoteAddress).
import { endpoint, json, readJson, PUBLIC_FORM_BYTES } from '~/lib/server/http';
import { addGuestNote, findShare, requireUnlocked } from '~/lib/server/share';
import { guestNoteBody } from '~/lib/export/schemas';
import { clientAddressOf } from '~/lib/server/client-address';
import { RULES, recordAttempt, throttled } from '~/lib/server/throttle';

export const POST = endpoint(async ({ params, cookies, request, clientAddress }) => {
  const body = await readJson(request, guestNoteBody, PUBLIC_FORM_BYTES);
  const opened = await findShare(params.token ?? '');
  requireUnlocked(opened, cookies);
  const attempt = await recordAttempt([
    { rule: RULES.guestNoteLink, key: `link:${opened.link.id}` },
    { rule: RULES.guestNoteAddress, key: clientAddressOf(request, clientAddress) },
  ]);
  if (!attempt.allowed) throw throttled(attempt, 'Too many comments on this link');
  return json({ note: await addGuestNote(opened, body) }, 201);
});
