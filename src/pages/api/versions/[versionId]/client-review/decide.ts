// POST /api/versions/:versionId/client-review/decide {decision: 'sign-off'|'ask-changes', comment?} →
// {version: {clientState, …}, unchanged}: the signed-in client's decision (client role only: studio roles get 403).
// 404 for a version not shared with the client (access.ts); 409 {error:{code:'conflict', reviewState, clientState}}
// before internal approval or before the studio asked; the same decision again answers with the state reached.
import { versionAccess } from '~/lib/server/access';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { clientDecides } from '~/lib/server/client-signoff';
import { clientDecisionBody } from '~/lib/review/client-signoff';

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'client');
  const body = await readJson(request, clientDecisionBody);
  return json(await clientDecides(access, version.id, body.decision, body.comment || null));
});
