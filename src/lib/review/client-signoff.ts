// The client's sign-off as the API takes it: zod bodies shared by the endpoints and the browser islands.
import { z } from 'zod';
import { CLIENT_DECISIONS } from './states';

const comment = z.string({ invalid_type_error: 'must be text' }).trim().max(2000, 'is too long (2000 characters at most)');
const decision = z.enum(CLIENT_DECISIONS, {
  errorMap: (_issue, ctx) => ({ message: ctx.data === undefined ? 'is required' : "must be 'sign-off' or 'ask-changes'" }),
});

/** POST /api/versions/:id/client-review: a supervisor asks the client to sign off (an optional word for them). */
export const askSignOffBody = z.object({ message: comment.optional() }).strict();

/** POST /api/versions/:id/client-review/decide: a signed-in client's decision (asking for changes needs a comment). */
export const clientDecisionBody = z.object({ decision, comment: comment.optional() }).strict();

/** POST /api/shared/:token/decision: a guest's decision, with the name the studio will see. */
export const guestDecisionBody = z
  .object({
    name: z.string({ required_error: 'is required', invalid_type_error: 'must be text' }).trim().min(1, 'is required').max(80, 'is too long (80 characters at most)'),
    decision,
    comment: comment.optional(),
    /** Where to send the confirmation of the decision (optional: a guest has no account we could write to). */
    email: z
      .union([z.literal(''), z.string({ invalid_type_error: 'must be text' }).trim().toLowerCase().max(254, 'is too long (254 characters at most)').email('is not an e-mail address')])
      .optional(),
  })
  .strict();
