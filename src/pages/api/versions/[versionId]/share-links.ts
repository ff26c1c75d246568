// POST /api/versions/:versionId/share-links {expiresAt, password?, exportAssetId?, email?, message?} → 201 {link, url,
// token}: a link for people outside the studio (the URL is shown once: only the token's hash is kept); e-mails it when
// `email` is given (supervisor). GET → {links}: the version's links with status and open counts (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { versionAccess } from '~/lib/server/access';
import { createShareLink, shareLinkViews } from '~/lib/server/share';
import { shareCreateBody } from '~/lib/export/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'supervisor');
  const body = await readJson(request, shareCreateBody);
  return json(await createShareLink(access, version, body), 201);
});

export const GET = endpoint(async ({ params, locals }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'supervisor');
  return json({ links: await shareLinkViews(access.studioId, { versionId: version.id }) });
});
