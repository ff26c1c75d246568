// POST /api/studios/:studioId/inbox/read {items: [{type: 'shot' | 'version' | 'note', id}]} or {all: true} → the
// inbox as GET answers it: marks single items read (an assignment, a version, one new note), or everything.
import { z } from 'zod';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { inboxFor, markInboxItemsRead, markInboxSeen } from '~/lib/server/review';

const Item = z
  .object({
    type: z.enum(['shot', 'version', 'note'], { errorMap: () => ({ message: 'must be shot, version or note' }) }),
    id: z.number({ required_error: 'is required', invalid_type_error: 'must be a number' }).int('must be a whole number').positive('must be positive'),
  })
  .strict();
const Body = z
  .object({
    items: z.array(Item, { invalid_type_error: 'must be a list' }).min(1, 'must name at least one item').max(200, 'at most 200 at a time').optional(),
    all: z.literal(true, { errorMap: () => ({ message: 'must be true' }) }).optional(),
  })
  .strict()
  .refine((b) => (b.items === undefined) !== (b.all === undefined), { message: 'give items (a list of {type, id}) or all: true', path: ['items'] });

export const POST = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'client');
  const body = await readJson(request, Body);
  if (body.all) await markInboxSeen(access);
  else await markInboxItemsRead(access, body.items ?? []);
  return json(await inboxFor(access));
});
