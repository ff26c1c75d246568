// POST /api/versions/:versionId/share {shared: boolean} → {version}: shows the version to the studio's clients or
// hides it again (supervisor or owner). A draft cannot be shared (409).
import { z } from 'zod';
import { versionAccess } from '~/lib/server/access';
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { setSharedWithClient } from '~/lib/server/review';

const Body = z.object({ shared: z.boolean({ required_error: 'is required', invalid_type_error: 'must be true or false' }) }).strict();

export const POST = endpoint(async ({ params, locals, request }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'supervisor');
  const body = await readJson(request, Body);
  return json({ version: await setSharedWithClient(access, version.id, body.shared) });
});
