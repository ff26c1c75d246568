// POST /api/share-links/:linkId/send {token, email, message?} → {sentTo}: e-mails an active link to a client; the
// caller sends the token it was given at creation (we keep only its hash) (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole, requireUser } from '~/lib/server/authz';
import { sendShareLink, shareLinkStudio } from '~/lib/server/share';
import { shareSendBody } from '~/lib/export/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  requireUser(locals);
  const linkId = idParam(params, 'linkId');
  const access = await requireRole(locals, await shareLinkStudio(linkId), 'supervisor');
  const body = await readJson(request, shareSendBody);
  return json(await sendShareLink(access, linkId, body));
});
