// POST /api/share-links/:linkId/revoke → {link}: turns the link off at once; later opens get 410 (supervisor).
import { endpoint, json, idParam, readEmptyBody } from '~/lib/server/http';
import { requireRole, requireUser } from '~/lib/server/authz';
import { revokeShareLink, shareLinkStudio } from '~/lib/server/share';

export const POST = endpoint(async ({ params, locals, request }) => {
  requireUser(locals);
  const linkId = idParam(params, 'linkId');
  const access = await requireRole(locals, await shareLinkStudio(linkId), 'supervisor');
  await readEmptyBody(request);
  return json({ link: await revokeShareLink(access, linkId) });
});
