// The web server's own bake slots (BAKE_WORKERS set on the web process): bakes run inside the app server, their
// claims carry the server's process id, and SIGTERM hands a running bake back to the queue before the server exits.
// A queue database of its own, so the test app's separate bake worker never takes these jobs.
import { describe, it, expect } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { tinyScene, slowScene } from '../support/scenes';
import { useQueueDatabase, waitFor } from '../support/bake-queue';
import { startSecondApp } from '../support/second-app';

const { t, makeVersion, jobOf, claimsOf } = useQueueDatabase({ BAKE_LEASE_MS: '5000', BAKE_POLL_MS: '100', BAKE_RETRY_DELAY_MS: '200', BAKE_MAX_ATTEMPTS: '3' });

describe('bakes inside the web server (BAKE_WORKERS)', () => {
  it('the web process bakes a queued job itself, and hands a running one back on SIGTERM', async () => {
    // process.env points at the queue database now (useQueueDatabase's beforeAll).
    const app = await startSecondApp({ BAKE_WORKERS: '1', TIDEMARK_NO_POOL: '' });
    try {
      // The pool starts with the first request (startSecondApp made it); its start is logged.
      await waitFor('the web server to start its bake slot', async () => /bake worker thread\(s\) started/.test(app.output()));
      const versionId = await makeVersion(tinyScene(6));
      const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
      const done = await waitFor('the web server to bake the job', async () => {
        const r = await jobOf(versionId);
        return r.job.state === 'done' ? r : null;
      }, 120_000);
      expect(done.version.bakeState).toBe('baked');
      expect(done.version.clipAssetId).toBeTruthy();
      const claims = await claimsOf([jobId!]);
      expect(claims).toHaveLength(1);
      // Worker ids are host:pid:slot (src/lib/bake/runner.ts defaultWorkerId): the web server's own pid.
      expect((claims[0].detail as { workerId: string }).workerId).toMatch(new RegExp(`:${app.child.pid}:0$`));

      // A long bake running in the web server: SIGTERM hands it back (attempt not counted), then the server exits.
      const slow = await makeVersion(slowScene(200));
      const slowJob = (await t.m.queue.enqueueBake(slow, t.studioId, t.userId)).jobId!;
      await waitFor('the slow bake to make progress in the web server', async () => (await jobOf(slow)).job.framesDone >= 1, 120_000);
      await app.stop();
      expect([app.child.exitCode, app.child.signalCode]).toEqual([0, null]);
      const back = await jobOf(slow);
      expect(back.job.state).toBe('queued');
      expect(back.job.attempts).toBe(0);
      expect(back.version.bakeState).toBe('queued');
      const { bakeAttempts } = t.m.schema;
      const attempts = await t.m.db.db().select().from(bakeAttempts).where(and(eq(bakeAttempts.jobId, slowJob)));
      expect(attempts.map((a) => a.state)).toEqual(['released']);
    } finally {
      await app.stop();
    }
  }, 300_000);
});
