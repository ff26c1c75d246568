// PATCH /api/studios/:studioId/members/:memberId {role} and DELETE: owners change roles or remove members (never the last owner).
import { z } from 'zod';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { changeMember } from '~/lib/server/members';
import { role } from '~/lib/server/validation';

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  const body = await readJson(request, z.object({ role }));
  return json({ member: await changeMember(access.studioId, idParam(params, 'memberId'), access.userId, { role: body.role }) });
});

export const DELETE = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  await changeMember(access.studioId, idParam(params, 'memberId'), access.userId, 'remove');
  return json(null, 204);
});
