// POST /api/auth/password-reset {email} → 202; e-mails a reset link when the account exists (says nothing either way).
import { z } from 'zod';
import { endpoint, json, readJson } from '~/lib/server/http';
import { email } from '~/lib/server/validation';
import { requestPasswordReset } from '~/lib/server/members';

export const POST = endpoint(async ({ request }) => {
  const body = await readJson(request, z.object({ email }));
  await requestPasswordReset(body.email);
  return json({ message: 'If that address has an account, a reset link is on its way.' }, 202);
});
