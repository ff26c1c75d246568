// POST /api/studios/:studioId/shows/:showId/import/preview {format: 'edl'|'csv', text, options?} → what an import would
// create, update and leave unchanged, and the errors by line; writes nothing (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { previewShowImport } from '~/lib/server/library';
import { importBody, MAX_IMPORT_BYTES } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, importBody, MAX_IMPORT_BYTES + 64 * 1024);
  return json({ preview: await previewShowImport(access, idParam(params, 'showId'), body) });
});
