// GET /api/shared/:token/media → short-lived URLs of what the link plays: {kind:'export', url, …} or
// {kind:'clip', clipUrl, statsUrl, plate, …}. Public (same refusals as GET /api/shared/:token); not counted as an open.
import { endpoint, json } from '~/lib/server/http';
import { findShare, publicShareMedia, requireUnlocked } from '~/lib/server/share';

export const GET = endpoint(async ({ params, cookies }) => {
  const opened = await findShare(params.token ?? '');
  requireUnlocked(opened, cookies);
  return json(await publicShareMedia(opened));
});
