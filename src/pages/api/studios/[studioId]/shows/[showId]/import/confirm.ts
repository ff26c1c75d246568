// POST /api/studios/:studioId/shows/:showId/import/confirm {format, text, options?, skipErrors?} → {created, updated,
// unchanged, errors, summary}: re-reads the text and applies it in one transaction; 422 with error.lines when lines
// have errors and skipErrors is not set (supervisor).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { confirmShowImport } from '~/lib/server/library';
import { importBody, MAX_IMPORT_BYTES } from '~/lib/library/schemas';

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, importBody, MAX_IMPORT_BYTES + 64 * 1024);
  return json({ import: await confirmShowImport(access, idParam(params, 'showId'), body) });
});
