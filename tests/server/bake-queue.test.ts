// The bake queue with real worker processes (`npm run worker`) against MariaDB and the S3 stand-in.
// These tests use a database of their own, so the test app's bake worker never takes their jobs.
import { describe, it, expect } from 'vitest';
import { createServer, type Server } from 'node:net';
import { eq } from 'drizzle-orm';
import { tinyScene, slowScene } from '../support/scenes';
import { useQueueDatabase, waitFor, workerReady, stopWorker } from '../support/bake-queue';

const { t, startWorker, makeVersion, jobOf, claimsOf } = useQueueDatabase({
  BAKE_LEASE_MS: '3000',
  BAKE_POLL_MS: '100',
  BAKE_RETRY_DELAY_MS: '200',
  BAKE_MAX_ATTEMPTS: '3',
});

describe('bake queue', () => {
  it('several workers never take the same job: each of many jobs is baked exactly once', async () => {
    // Workers first, and jobs long enough (a few hundred ms each) that every worker is polling while others bake.
    // A lease long enough that a slow frame on a loaded machine never lets it lapse (lapses are the next test's subject).
    const lease = { BAKE_LEASE_MS: '15000' };
    const started = [startWorker(lease, 2), startWorker(lease, 1), startWorker(lease, 1)];
    await Promise.all(started.map((w) => workerReady(w)));
    const versionIds: number[] = [];
    for (let i = 0; i < 10; i++) versionIds.push(await makeVersion(slowScene(4)));
    const jobIds: number[] = [];
    for (const id of versionIds) jobIds.push((await t.m.queue.enqueueBake(id, t.studioId, t.userId)).jobId!);
    await waitFor('all jobs done', async () => {
      const rows = await Promise.all(versionIds.map(jobOf));
      return rows.every((r) => r.job.state === 'done');
    });
    const rows = await Promise.all(versionIds.map(jobOf));
    for (const r of rows) {
      expect(r.job.attempts).toBe(1);
      expect(r.version.bakeState).toBe('baked');
      expect(r.version.clipAssetId).toBeTruthy();
    }
    const claims = await claimsOf(jobIds);
    expect(claims).toHaveLength(jobIds.length);
    expect(new Set(claims.map((c) => c.targetId)).size).toBe(jobIds.length);
    // The work was spread over more than one worker.
    expect(new Set(claims.map((c) => (c.detail as { workerId: string }).workerId)).size).toBeGreaterThan(1);
  });

  it('a worker killed mid-bake: its lease runs out and another worker finishes the job', async () => {
    const versionId = await makeVersion(slowScene(60));
    const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    const first = startWorker();
    await waitFor('the first worker to make progress', async () => (await jobOf(versionId)).job.framesDone >= 2);
    const owner = (await jobOf(versionId)).job.leaseOwner;
    await stopWorker(first, 'SIGKILL');
    const killedAt = Date.now();
    startWorker();
    const done = await waitFor('the job to finish on the second worker', async () => {
      const r = await jobOf(versionId);
      return r.job.state === 'done' ? r : null;
    }, 120_000);
    expect(done.job.attempts).toBe(2);
    expect(done.version.bakeState).toBe('baked');
    const claims = await claimsOf([jobId!]);
    expect(claims).toHaveLength(2);
    expect((claims[1].detail as { workerId: string }).workerId).not.toBe(owner);
    expect(claims[1].createdAt.getTime()).toBeGreaterThanOrEqual(killedAt - 50);
    // Two slow bakes back to back on a shared machine: longer than the default test timeout.
  }, 180_000);

  it('the object store going away mid-upload: the job retries, then fails clearly, and nothing is marked baked', async () => {
    // A stand-in that accepts connections and drops them after the first bytes, like a store that stops mid-upload.
    const dropper: Server = createServer((socket) => socket.once('data', () => socket.destroy()));
    await new Promise<void>((r) => dropper.listen(0, '127.0.0.1', () => r()));
    const port = (dropper.address() as { port: number }).port;
    try {
      const versionId = await makeVersion(tinyScene(4));
      await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
      startWorker({ S3_ENDPOINT: `http://127.0.0.1:${port}` });
      const failed = await waitFor('the job to fail', async () => {
        const r = await jobOf(versionId);
        return r.job.state === 'failed' ? r : null;
      });
      expect(failed.job.attempts).toBe(3);
      expect(failed.job.error).toMatch(/Bake failed after 3 attempt\(s\): could not reach the object store/);
      expect(failed.version.bakeState).toBe('failed');
      expect(failed.version.clipAssetId).toBeNull();
      const clips = await t.m.db.db().select().from(t.m.schema.assets).where(eq(t.m.schema.assets.versionId, versionId));
      expect(clips).toHaveLength(0);
    } finally {
      dropper.close();
    }
  });

  it('cancel stops a bake mid-way', async () => {
    const versionId = await makeVersion(slowScene(80));
    await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    startWorker();
    await waitFor('progress', async () => (await jobOf(versionId)).job.framesDone >= 2);
    expect(await t.m.queue.cancelBake(versionId, t.studioId, t.userId)).toBe('cancelling');
    const r = await waitFor('the job to be cancelled', async () => {
      const x = await jobOf(versionId);
      return x.job.state === 'cancelled' ? x : null;
    });
    expect(r.job.framesDone).toBeLessThan(r.job.framesTotal);
    expect(r.version.bakeState).toBe('cancelled');
    expect(r.version.clipAssetId).toBeNull();
  });

  it('a queued bake cancels at once; an invalid scene fails without retrying', async () => {
    const queued = await makeVersion(tinyScene(4));
    await t.m.queue.enqueueBake(queued, t.studioId, t.userId);
    expect(await t.m.queue.cancelBake(queued, t.studioId, t.userId)).toBe('cancelled');
    expect((await jobOf(queued)).version.bakeState).toBe('cancelled');

    const bad = await makeVersion(tinyScene(4));
    // Damage the stored scene behind the API's back: the worker must refuse it with the validation message.
    await t.m.db.db().update(t.m.schema.versions).set({ scene: { version: 1, tank: { width: -1 } } }).where(eq(t.m.schema.versions.id, bad));
    await t.m.queue.enqueueBake(bad, t.studioId, t.userId);
    startWorker();
    const r = await waitFor('the invalid scene to fail', async () => {
      const x = await jobOf(bad);
      return x.job.state === 'failed' ? x : null;
    });
    expect(r.job.attempts).toBe(1);
    expect(r.job.error).toMatch(/The scene is not valid: .*tank/);
  });

  it('a bake thread past its heap limit fails the job with that message, without retrying, and the worker lives on', async () => {
    const versionId = await makeVersion(slowScene(10));
    await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    // 2 MB of V8 heap is too little for the thread to load the solver. (The solver's typed arrays live outside
    // the V8 heap, so resourceLimits bounds the thread's JavaScript objects, not the grid and particle arrays.)
    const worker = startWorker({ BAKE_THREAD_MEMORY_MB: '2' });
    const r = await waitFor('the job to fail', async () => {
      const x = await jobOf(versionId);
      return x.job.state === 'failed' || x.job.state === 'done' ? x : null;
    });
    expect(r.job.state).toBe('failed');
    expect(r.job.attempts).toBe(1);
    expect(r.job.error).toMatch(/more memory than a bake thread may use \(2 MB\)/);
    expect(worker.exitCode).toBeNull();
  });
  it('a result under a lapsed lease that nobody claimed yet is refused; the next claim runs the job and clears the late objects', async () => {
    // The lease rule (src/lib/bake/queue.ts holdsLease): held until lease_expires_at, not after; past it the job is
    // the queue's. No worker process here: the calls are the ones a worker makes, with the lease made to lapse.
    const { db } = t.m.db;
    const { bakeJobs, bakeAttempts, assets } = t.m.schema;
    const { putBytes, headObject } = await import('../../src/lib/server/storage');
    const versionId = await makeVersion(tinyScene());
    const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    const a = (await t.m.queue.claimNext('worker-a'))!;
    expect(a.jobId).toBe(jobId);
    // While the lease holds, a renewal is accepted.
    expect(await t.m.queue.renewLease(a.jobId, 'worker-a', 1)).toBe('ok');
    await putBytes(a.keys.clip, new Uint8Array([1, 2, 3]), 'application/x-tidemark-clip');
    await db().update(bakeJobs).set({ leaseExpiresAt: new Date(Date.now() - 60_000) }).where(eq(bakeJobs.id, jobId!));
    const clip = { key: a.keys.clip, bytes: 3, sha256: 'f'.repeat(64), meta: {} };
    expect(await t.m.queue.renewLease(a.jobId, 'worker-a', 2)).toBe('lost');
    expect(await t.m.queue.completeJob(a, 'worker-a', clip, { key: a.keys.stats, bytes: 0 })).toBe(false);
    expect(await t.m.queue.failAttempt(a, 'worker-a', 'late', true)).toBe('lost');
    let r = await jobOf(versionId);
    expect(r.version.clipAssetId).toBeNull();
    expect(r.job.state).toBe('running'); // still the lapsed claim's until the queue gives it out again
    const b = (await t.m.queue.claimNext('worker-b'))!;
    expect(b.jobId).toBe(jobId);
    expect(b.attempt).toBe(2);
    const attempts = await db().select().from(bakeAttempts).where(eq(bakeAttempts.jobId, jobId!)).orderBy(bakeAttempts.attempt);
    expect(attempts.map((x) => x.state)).toEqual(['lost', 'running']);
    expect(await headObject(a.keys.clip)).toBeNull();
    expect(await t.m.queue.completeJob(b, 'worker-b', { ...clip, key: b.keys.clip }, { key: b.keys.stats, bytes: 0 })).toBe(true);
    r = await jobOf(versionId);
    expect(r.job.state).toBe('done');
    const clips = await db().select().from(assets).where(eq(assets.versionId, versionId));
    expect(clips.map((c) => c.storageKey)).toEqual([b.keys.clip]);
  });
});
