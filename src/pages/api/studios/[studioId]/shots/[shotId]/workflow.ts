// PATCH /api/studios/:studioId/shots/:shotId/workflow {status?, assigneeId?} → {shot}: the table's inline edit (artist).
import { endpoint, json, idParam, readJson } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { updateShotWorkflow } from '~/lib/server/library';
import { shotWorkflowPatch } from '~/lib/library/schemas';

export const PATCH = endpoint(async ({ params, locals, request }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  const body = await readJson(request, shotWorkflowPatch);
  return json({ shot: await updateShotWorkflow(access, idParam(params, 'shotId'), body) });
});
