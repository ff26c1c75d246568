// POST /api/versions/:versionId/review/submit {comment?} → {version, event}: draft → submitted (artist+, baked only).
// 409 {error:{code:'conflict', currentState}} when the version is not a draft or not baked; 400 naming overrideReason
// when the bake's health verdict has findings and no reason to submit it anyway was given.
import { z } from 'zod';
import { versionAccess } from '~/lib/server/access';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { transitionVersion } from '~/lib/server/review';

const Body = z
  .object({
    comment: z.string({ invalid_type_error: 'must be text' }).trim().max(2000, 'is too long (2000 characters at most)').optional(),
    /** Needed when the bake's health verdict has findings: why it should be reviewed as it is. */
    overrideReason: z.string({ invalid_type_error: 'must be text' }).trim().min(3, 'is too short (3 characters at least)').max(500, 'is too long (500 characters at most)').optional(),
  })
  .strict();

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'artist');
  const body = await readJson(request, Body);
  return json(await transitionVersion(access, version.id, 'submit', body.comment || null, body.overrideReason ?? null));
});
