// POST /api/versions/:versionId/exports/:assetId/complete → {export}: checks the uploaded object (its size against the
// declared one, its type by magic bytes) and lists it; 409 before the upload, 422 (file removed) when it is wrong (artist).
import { endpoint, json, idParam, readEmptyBody } from '~/lib/server/http';
import { versionAccess } from '~/lib/server/access';
import { completeExport } from '~/lib/server/exports';

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'artist');
  await readEmptyBody(request);
  return json({ export: await completeExport(access, version, idParam(params, 'assetId')) });
});
