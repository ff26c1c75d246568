// GET /api/studios/:studioId/shots/:shotId/activity → {activity: [{id, action, actorName, detail, createdAt}]}:
// the shot's history from the audit log, newest first (artist; clients never see the studio's internal history).
import { endpoint, json, idParam } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { listShotActivity } from '~/lib/server/activity';

export const GET = endpoint(async ({ params, locals }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'artist');
  return json({ activity: await listShotActivity(access, idParam(params, 'shotId')) });
});
