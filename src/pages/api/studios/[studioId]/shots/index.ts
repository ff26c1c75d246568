// GET /api/studios/:studioId/shots?showId&status&assignee&q&archived&sort&order&page&pageSize → {items, total, page, pageSize}
// (any member; clients see shots of shared shows only). POST {showId, code, lastFrame, …} → 201 {shot} (supervisor).
import { endpoint, json, idParam, readJson, readQuery } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { createShot, listShots } from '~/lib/server/library';
import { shotCreate, shotListQuery } from '~/lib/library/schemas';

export const GET = endpoint(async ({ params, locals, url }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  return json(await listShots(access, readQuery(url, shotListQuery)));
});

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const body = await readJson(request, shotCreate);
  return json({ shot: await createShot(access, body) }, 201);
});
