// POST /api/versions/:versionId/review/decide {decision: 'approved'|'returned', comment?} → {version, event}
// (supervisor or owner; a return needs a comment). Two decisions at once: one wins, the other gets
// 409 {error:{code:'conflict', message, currentState}}.
import { z } from 'zod';
import { versionAccess } from '~/lib/server/access';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { transitionVersion } from '~/lib/server/review';

const Body = z
  .object({
    decision: z.enum(['approved', 'returned'], { errorMap: () => ({ message: "must be 'approved' or 'returned'" }) }),
    comment: z.string({ invalid_type_error: 'must be text' }).trim().max(5000, 'is too long (5000 characters at most)').optional(),
  })
  .strict();

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'supervisor');
  const body = await readJson(request, Body);
  return json(await transitionVersion(access, version.id, body.decision === 'approved' ? 'approve' : 'return', body.comment || null));
});
