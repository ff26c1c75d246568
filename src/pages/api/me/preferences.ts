// GET /api/me/preferences → {preferences: {dailyDigest}}; PATCH {dailyDigest: boolean} → the same (signed in).
import { z } from 'zod';
import { endpoint, json, readJson } from '~/lib/server/http';
import { requireUser } from '~/lib/server/authz';
import { audit } from '~/lib/server/audit';
import { preferencesOf, setDailyDigest } from '~/lib/server/notify';

const Body = z.object({ dailyDigest: z.boolean({ required_error: 'is required', invalid_type_error: 'must be true or false' }) }).strict();

export const GET = endpoint(async ({ locals }) => {
  const user = requireUser(locals);
  return json({ preferences: await preferencesOf(user.id) });
});

export const PATCH = endpoint(async ({ locals, request }) => {
  const user = requireUser(locals);
  const body = await readJson(request, Body);
  const preferences = await setDailyDigest(user.id, body.dailyDigest);
  await audit({ studioId: null, actorId: user.id, action: 'preferences.update', detail: { dailyDigest: body.dailyDigest } });
  return json({ preferences });
});
