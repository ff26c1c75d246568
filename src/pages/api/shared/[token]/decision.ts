// POST /api/shared/:token/decision {name, decision: 'sign-off'|'ask-changes', comment?, email?} → {version: {clientState, …},
// unchanged, confirmationTo} (a confirmation is e-mailed to `email` when given): a guest's sign-off through the share link. Public (same refusals as GET /api/shared/:token); 409 before
// internal approval or before the studio asked for a sign-off; the same decision again answers with the state reached.
import { endpoint, json, readJson } from '~/lib/server/http';
import { findShare, requireUnlocked, shareUrl } from '~/lib/server/share';
import { guestDecides } from '~/lib/server/client-signoff';
import { guestDecisionBody } from '~/lib/review/client-signoff';

export const POST = endpoint(async ({ params, cookies, request }) => {
  const body = await readJson(request, guestDecisionBody);
  const opened = await findShare(params.token ?? '');
  requireUnlocked(opened, cookies);
  return json(await guestDecides(opened, body, shareUrl(params.token ?? '')));
});
