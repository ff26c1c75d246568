// GET /api/studios/:studioId/shows?q&archived&sort&order&page&pageSize → {items, total, page, pageSize} (any member; clients see shared shows only)
// POST {code, name, description?, frameRate?} → 201 {show} (supervisor).
import { endpoint, json, idParam, readJson, readQuery } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { createShow, listShows } from '~/lib/server/library';
import { showCreate, showListQuery } from '~/lib/library/schemas';

export const GET = endpoint(async ({ params, locals, url }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  return json(await listShows(access, readQuery(url, showListQuery)));
});

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, showCreate);
  return json({ show: await createShow(access, body) }, 201);
});
