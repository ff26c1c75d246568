// POST /api/shared/:token/unlock {password} → {unlocked: true} and an HttpOnly cookie for this link; 401 when the
// password is wrong, 429 after too many wrong tries. Public.
import { endpoint, json, readJson, PUBLIC_FORM_BYTES } from '~/lib/server/http';
import { findShare, unlockShare } from '~/lib/server/share';
import { shareUnlockBody } from '~/lib/export/schemas';
import { clientAddressOf } from '~/lib/server/client-address';

export const POST = endpoint(async ({ params, cookies, request, clientAddress }) => {
  const { password } = await readJson(request, shareUnlockBody, PUBLIC_FORM_BYTES);
  const opened = await findShare(params.token ?? '');
  await unlockShare(opened, password, cookies, '/', clientAddressOf(request, clientAddress));
  return json({ unlocked: true });
});
