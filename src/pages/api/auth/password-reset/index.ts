// POST /api/auth/password-reset {email} → 202; e-mails a reset link when the account exists (says nothing either way).
import { z } from 'zod';
import { endpoint, json, readJson, PUBLIC_FORM_BYTES } from '~/lib/server/http';
import { email } from '~/lib/forms/fields';
import { requestPasswordReset } from '~/lib/server/members';
import { clientAddressOf } from '~/lib/server/client-address';

export const POST = endpoint(async ({ request, clientAddress }) => {
  const body = await readJson(request, z.object({ email }), PUBLIC_FORM_BYTES);
  // The same answer for known and unknown addresses, throttled or not, with SMTP up or down.
  await requestPasswordReset(body.email, clientAddressOf(request, clientAddress));
  return json({ message: 'If that address has an account, a reset link is on its way.' }, 202);
});
