// Housekeeping on a schedule: throttle hits and sign-in attempts past any window, finished bake jobs past the
// retention (the newest job of each version is kept: the version page shows how its last bake ended), and uploads
// (plates, thumbnails, exports) started but never completed: their rows and whatever reached the store; and objects a
// form wrote under uploads/ after its upload was completed.
import { and, eq, inArray, lt, sql } from 'drizzle-orm';
import { db } from './db';
import { assets, bakeJobs, signInAttempts, throttleHits } from './db/schema';
import { deleteObject } from './storage';
import { sweepUploadPrefix } from './uploads';

/**
 * pendingUploadsHours: an upload form is valid 15 minutes, so after this long a pending upload can only be one whose
 * completion never came (the browser closed, the check was never asked for).
 */
export const RETENTION = { throttleHitsHours: 48, signInAttemptsDays: 2, finishedJobsDays: 30, pendingUploadsHours: 6 } as const;

/** Deletes uploads still pending at `before` and their objects (a missing object is fine); returns how many. */
export async function purgeStaleUploads(before: Date): Promise<number> {
  const stale = await db()
    .select({ id: assets.id, storageKey: assets.storageKey })
    .from(assets)
    .where(and(inArray(assets.kind, ['plate', 'thumbnail', 'export', 'picture']), lt(assets.createdAt, before), sql`JSON_VALUE(${assets.meta}, '$.state') = 'pending'`))
    .limit(1000);
  let purged = 0;
  for (const a of stale) {
    try {
      // The object first: a row without its object is harmless, an object without its row would never be found again.
      await deleteObject(a.storageKey);
      await db().delete(assets).where(and(eq(assets.id, a.id), sql`JSON_VALUE(${assets.meta}, '$.state') = 'pending'`));
      purged++;
    } catch (err) {
      console.error(`[housekeeping] could not purge pending upload ${a.id}: ${err instanceof Error ? err.message : err}`);
    }
  }
  return purged;
}

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
  const pendingUploads = await purgeStaleUploads(before(RETENTION.pendingUploadsHours * 3600_000));
  // Objects a form wrote under uploads/ after its upload was completed (or refused): nothing points at them.
  const strayUploads = await sweepUploadPrefix(before(RETENTION.pendingUploadsHours * 3600_000));
  return { throttleHits: hits.affectedRows, signInAttempts: attempts.affectedRows, bakeJobs: jobs.affectedRows, pendingUploads, strayUploads };
}

/** Runs purgeOld every `everyMs` (first run after a minute); the timer never keeps the process alive. */
export function schedulePurge(everyMs = 3600_000) {
  const run = () => purgeOld().catch((err) => console.error('[housekeeping] purge failed:', err));
  setTimeout(run, 60_000).unref();
  setInterval(run, everyMs).unref();
}
