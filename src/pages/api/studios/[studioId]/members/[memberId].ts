// PATCH /api/studios/:studioId/members/:memberId {role} or {showIds} (a client's shows) and DELETE: owners change roles or remove members (never the last owner).
import { z } from 'zod';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { changeMember, setClientShows } from '~/lib/server/members';
import { role } from '~/lib/forms/fields';

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  const body = await readJson(
    request,
    z.union([z.object({ role }).strict(), z.object({ showIds: z.array(z.number().int().positive()).max(1000, 'names too many shows') }).strict()]),
  );
  const memberId = idParam(params, 'memberId');
  if ('showIds' in body) return json({ member: await setClientShows(access.studioId, memberId, access.userId, body.showIds) });
  return json({ member: await changeMember(access.studioId, memberId, access.userId, { role: body.role }) });
});

export const DELETE = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  await changeMember(access.studioId, idParam(params, 'memberId'), access.userId, 'remove');
  return json(null, 204);
});
