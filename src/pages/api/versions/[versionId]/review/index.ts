// GET /api/versions/:versionId/review → {version, events, actions, clientSteps}: the version's review state and client
// sign-off, its review events (oldest first; a client sees no comments), the review actions and the client sign-off
// steps the caller may take now (any member who may see it).
import { endpoint, json, idParam } from '~/lib/server/http';
import { asSeenBy, versionAccess } from '~/lib/server/access';
import { reviewHistory, reviewVersionView } from '~/lib/server/review';
import { availableActions, availableClientSteps } from '~/lib/review/states';

export const GET = endpoint(async ({ params, locals }) => {
  const { version, access } = await versionAccess(locals, idParam(params, 'versionId'), 'client');
  return json({
    version: asSeenBy(access, reviewVersionView(version)),
    events: await reviewHistory(access, version.id),
    actions: availableActions(access.role, version.reviewState, version.bakeState),
    clientSteps: availableClientSteps(access.role, version.reviewState, version.clientState),
    canShare: access.role === 'supervisor' || access.role === 'owner',
  });
});
