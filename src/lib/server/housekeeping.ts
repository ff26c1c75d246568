// Housekeeping on a schedule: throttle hits and sign-in attempts past any window, and finished bake jobs past the
// retention (the newest job of each version is kept: the version page shows how its last bake ended).
import { and, inArray, lt, sql } from 'drizzle-orm';
import { db } from './db';
import { bakeJobs, signInAttempts, throttleHits } from './db/schema';

export const RETENTION = { throttleHitsHours: 48, signInAttemptsDays: 2, finishedJobsDays: 30 } as const;

/** Deletes what is past its retention at `now`; returns the number of rows deleted per table. */
export async function purgeOld(now = new Date()) {
  const before = (ms: number) => new Date(now.getTime() - ms);
  const [hits] = await db().delete(throttleHits).where(lt(throttleHits.createdAt, before(RETENTION.throttleHitsHours * 3600_000)));
  const [attempts] = await db().delete(signInAttempts).where(lt(signInAttempts.createdAt, before(RETENTION.signInAttemptsDays * 86_400_000)));
  const [jobs] = await db()
    .delete(bakeJobs)
    .where(
      and(
        inArray(bakeJobs.state, ['done', 'failed', 'cancelled']),
        lt(bakeJobs.updatedAt, before(RETENTION.finishedJobsDays * 86_400_000)),
        sql`${bakeJobs.id} NOT IN (SELECT id FROM (SELECT max(id) AS id FROM bake_jobs GROUP BY version_id) AS newest)`,
      ),
    );
  return { throttleHits: hits.affectedRows, signInAttempts: attempts.affectedRows, bakeJobs: jobs.affectedRows };
}

/** Runs purgeOld every `everyMs` (first run after a minute); the timer never keeps the process alive. */
export function schedulePurge(everyMs = 3600_000) {
  const run = () => purgeOld().catch((err) => console.error('[housekeeping] purge failed:', err));
  setTimeout(run, 60_000).unref();
  setInterval(run, everyMs).unref();
}
