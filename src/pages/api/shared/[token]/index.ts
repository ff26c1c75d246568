// GET /api/shared/:token → {share}: what a share link shows (slate facts, media kind, caution); counts an open.
// Public. 404 (one answer for any unknown token), 410 expired or turned off, 401 {passwordRequired} until unlocked.
import { endpoint, json } from '~/lib/server/http';
import { countOpen, findShare, publicShareInfo, requireUnlocked } from '~/lib/server/share';

export const GET = endpoint(async ({ params, cookies }) => {
  const opened = await findShare(params.token ?? '');
  requireUnlocked(opened, cookies);
  const share = await publicShareInfo(opened);
  await countOpen(opened.link);
  return json({ share });
});
