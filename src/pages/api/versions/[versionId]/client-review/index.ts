// POST /api/versions/:versionId/client-review {message?} → {version: {clientState, …}, unchanged}: asks the client to
// sign off a version approved by us (supervisor or owner): shows it to the show's client accounts and e-mails them.
// 409 {error:{code:'conflict', reviewState, clientState}} before internal approval; asking again while the client's
// answer is awaited changes nothing (unchanged: true).
import { versionAccess } from '~/lib/server/access';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { askClientSignOff } from '~/lib/server/client-signoff';
import { askSignOffBody } from '~/lib/review/client-signoff';

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'supervisor');
  const body = await readJson(request, askSignOffBody);
  return json(await askClientSignOff(access, version.id, body.message || null));
});
