// POST /api/auth/password-reset/confirm {token, password} → 200; sets the new password, signs out everywhere.
import { z } from 'zod';
import { endpoint, json, readJson, PUBLIC_FORM_BYTES } from '~/lib/server/http';
import { password } from '~/lib/forms/fields';
import { completePasswordReset } from '~/lib/server/members';

const Body = z.object({ token: z.string({ required_error: 'is required' }).min(1, 'is required').max(100, 'is too long'), password });

export const POST = endpoint(async ({ request }) => {
  const body = await readJson(request, Body, PUBLIC_FORM_BYTES);
  await completePasswordReset(body.token, body.password);
  return json({ message: 'Password changed. Sign in with the new one.' });
});
