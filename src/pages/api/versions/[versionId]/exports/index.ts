// POST /api/versions/:versionId/exports {format, byteSize, fileName, options} → 201 {assetId, upload}: a presigned POST
// form (key, type and 1…byteSize bytes bound) for the file the browser rendered (artist; baked versions only; 413 over the size limit, nothing written).
// GET → {exports}: the version's stored exports with who, when, format, size and a download link (artist).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { versionAccess } from '~/lib/server/access';
import { exportViews, startExport } from '~/lib/server/exports';
import { exportStartBody } from '~/lib/export/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'artist');
  const body = await readJson(request, exportStartBody);
  return json(await startExport(access, version, body), 201);
});

export const GET = endpoint(async ({ params, locals }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'artist');
  return json({ exports: await exportViews(access.studioId, { versionId: version.id }) });
});
