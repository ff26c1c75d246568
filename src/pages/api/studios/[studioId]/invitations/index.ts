// GET /api/studios/:studioId/invitations and POST {email, role, showIds? (a client's shows)}: owners invite people by e-mail.
import { z } from 'zod';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { invite, listInvitations } from '~/lib/server/members';
import { email, role } from '~/lib/forms/fields';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  return json({ invitations: await listInvitations(access.studioId) });
});

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'owner');
  const body = await readJson(request, z.object({ email, role, showIds: z.array(z.number().int().positive()).max(1000, 'names too many shows').optional() }));
  return json({ invitation: await invite(access.studioId, access.userId, body.email, body.role, body.showIds) }, 201);
});
