// POST /api/studios/:studioId/inbox/dismiss {versionId} → the inbox as GET answers it: takes one of the artist's
// versions sent back off their inbox before a newer version is submitted (only their own inbox changes).
import { z } from 'zod';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { dismissReturned, inboxFor } from '~/lib/server/review';

const Body = z
  .object({ versionId: z.number({ required_error: 'is required', invalid_type_error: 'must be a number' }).int('must be a whole number').positive('must be positive') })
  .strict();

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  const body = await readJson(request, Body);
  await dismissReturned(access, body.versionId);
  return json(await inboxFor(access));
});
