// Leases under slow frames, slow uploads and killed workers (BAKE_LEASE_MS=1500): the lease is renewed on a timer
// the solver and the upload cannot block, object keys are per attempt, and no attempt leaves an object behind.
import { describe, it, expect, afterEach } from 'vitest';
import { ListObjectsV2Command } from '@aws-sdk/client-s3';
import { eq } from 'drizzle-orm';
import { slowScene, tinyScene } from '../support/scenes';
import { useQueueDatabase, waitFor, workerReady, stopWorker } from '../support/bake-queue';
import { startStoreProxy } from '../support/store-proxy';
import { bucket, getObject, objectDigest, s3 } from '../../src/lib/server/storage';

const LEASE_MS = 1500;
const { t, startWorker, makeVersion, jobOf, claimsOf } = useQueueDatabase({
  BAKE_LEASE_MS: String(LEASE_MS),
  BAKE_POLL_MS: '100',
  BAKE_RETRY_DELAY_MS: '200',
  BAKE_MAX_ATTEMPTS: '3',
});
const store = process.env.S3_ENDPOINT!;
const isClipUpload = (method: string, url: string) => (method === 'PUT' || method === 'POST') && url.includes('.tdmclip');

const proxies: { close(): Promise<void> }[] = [];
afterEach(async () => {
  await Promise.all(proxies.splice(0).map((p) => p.close()));
});

/** Every object the studio's clips prefix holds for the job's scene. */
async function objectsOf(sceneHash: string): Promise<string[]> {
  const res = await s3().send(new ListObjectsV2Command({ Bucket: bucket(), Prefix: `studios/${t.studioId}/clips/${sceneHash}` }));
  return (res.Contents ?? []).map((o) => o.Key!).sort();
}

/** The version's clip assets; checks the one there is against the stored object and returns it. */
async function theOneClip(versionId: number) {
  const { assets } = t.m.schema;
  const rows = await t.m.db.db().select().from(assets).where(eq(assets.versionId, versionId));
  expect(rows).toHaveLength(1);
  const [clip] = rows;
  const stored = await objectDigest(clip.storageKey);
  expect(stored.size).toBe(clip.byteSize);
  expect(stored.sha256).toBe(clip.sha256);
  expect(clip.sha256).toMatch(/^[0-9a-f]{64}$/);
  return clip;
}

async function attemptsOf(jobId: number) {
  const { bakeAttempts } = t.m.schema;
  return t.m.db.db().select().from(bakeAttempts).where(eq(bakeAttempts.jobId, jobId)).orderBy(bakeAttempts.id);
}

describe('bake leases', () => {
  it("worker A's clip upload held 5 s by a proxy: A keeps its lease, the idle worker B never claims; one done, one clip", async () => {
    const proxy = await startStoreProxy(store, (req) => (isClipUpload(req.method!, req.url!) ? { delayMs: 5000 } : undefined));
    proxies.push(proxy);
    const a = startWorker({ S3_ENDPOINT: proxy.url });
    await workerReady(a);
    const versionId = await makeVersion(tinyScene(6));
    const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    await waitFor('A to claim the job', async () => (await jobOf(versionId)).job.state === 'running');
    const b = startWorker();
    await workerReady(b);
    const held = await proxy.waitFor((r) => isClipUpload(r.method, r.url));
    const done = await waitFor('the job to finish', async () => {
      const r = await jobOf(versionId);
      return r.job.state === 'done' || r.job.state === 'failed' ? r : null;
    });
    expect(done.job.state).toBe('done');
    // The upload really was held for more than three leases.
    expect(held.forwardedAt! - held.at).toBeGreaterThanOrEqual(5000);
    expect(held.forwardedAt! - held.at).toBeGreaterThan(3 * LEASE_MS);
    expect(done.job.attempts).toBe(1);
    expect(await claimsOf([jobId!])).toHaveLength(1);
    const clip = await theOneClip(versionId);
    expect(done.version.clipAssetId).toBe(clip.id);
    const meta = clip.meta as { statsKey: string };
    expect(await objectsOf(done.job.sceneHash)).toEqual([clip.storageKey, meta.statsKey].sort());
  });

  it('a single frame taking over 3 leases, another worker idle: one attempt, one claim', async () => {
    const a = startWorker();
    const b = startWorker();
    await Promise.all([workerReady(a), workerReady(b)]);
    // One frame of 200 substeps (the schema's most) on a 160 × 160 grid: about 10 s of solver work between two
    // frames on a quiet machine (80 substeps at 128² took 2.8 s, under the three leases this test needs).
    const doc = {
      ...tinyScene(2),
      tank: { width: 1, height: 1, cellSize: 1 / 160 },
      timing: { fps: 24, startFrame: 1001, endFrame: 1002, substeps: 200 },
      pours: [{ id: 'block', shape: { type: 'rect', x: 0, y: 0, width: 0.5, height: 0.8 }, velocity: [0, 0] }],
    };
    const versionId = await makeVersion(doc);
    const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    const done = await waitFor('the job to finish', async () => {
      const r = await jobOf(versionId);
      return r.job.state === 'done' || r.job.state === 'failed' ? r : null;
    }, 150_000);
    expect(done.job.state).toBe('done');
    const clip = await theOneClip(versionId);
    const stats = JSON.parse(new TextDecoder().decode(await getObject((clip.meta as { statsKey: string }).statsKey)));
    // The premise: the frame's solve took over three leases.
    expect(stats.frames[1].stepMs).toBeGreaterThan(3 * LEASE_MS);
    expect(done.job.attempts).toBe(1);
    expect(await claimsOf([jobId!])).toHaveLength(1);
  }, 180_000);

  it('a worker killed after its upload, before completing: done on the second attempt, one asset, no orphan object', async () => {
    // After the upload the worker asks the store for its clip's size (HEAD; the checksum was computed while sending):
    // hold that request, and kill it there.
    const proxy = await startStoreProxy(store, (req) => (req.method === 'HEAD' && req.url!.includes('.tdmclip') ? { hold: true } : undefined));
    proxies.push(proxy);
    const a = startWorker({ S3_ENDPOINT: proxy.url });
    await workerReady(a);
    const versionId = await makeVersion(tinyScene(6));
    const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    await proxy.waitFor((r) => r.method === 'HEAD' && r.url.includes('.tdmclip'));
    const [first] = await attemptsOf(jobId!);
    // A's clip and stats are in the store now.
    expect((await objectsOf((await jobOf(versionId)).job.sceneHash)).sort()).toEqual([first.clipKey, first.statsKey].sort());
    await stopWorker(a, 'SIGKILL');
    expect((await jobOf(versionId)).job.state).toBe('running');
    startWorker();
    const done = await waitFor('the job to finish on the second worker', async () => {
      const r = await jobOf(versionId);
      return r.job.state === 'done' || r.job.state === 'failed' ? r : null;
    });
    expect(done.job.state).toBe('done');
    expect(done.job.attempts).toBe(2);
    const clip = await theOneClip(versionId);
    expect(clip.storageKey).not.toBe(first.clipKey);
    const meta = clip.meta as { statsKey: string };
    expect(await objectsOf(done.job.sceneHash)).toEqual([clip.storageKey, meta.statsKey].sort());
    const attempts = await attemptsOf(jobId!);
    expect(attempts.map((x) => [x.state, x.objectsCleared])).toEqual([
      ['lost', true],
      ['done', false],
    ]);
  });

  it('a worker whose lease is taken during its upload aborts the upload and leaves nothing; the next claim finishes', async () => {
    const proxy = await startStoreProxy(store, (req) => (isClipUpload(req.method!, req.url!) ? { delayMs: 5000 } : undefined));
    proxies.push(proxy);
    const a = startWorker({ S3_ENDPOINT: proxy.url });
    await workerReady(a);
    const versionId = await makeVersion(tinyScene(6));
    const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    const held = await proxy.waitFor((r) => isClipUpload(r.method, r.url));
    // Another owner takes the job while A's upload is held (as a reclaim after a lapsed lease would).
    const { bakeJobs } = t.m.schema;
    await t.m.db.db().update(bakeJobs).set({ leaseOwner: 'someone-else' }).where(eq(bakeJobs.id, jobId!));
    await waitFor('A to give up its upload', async () => held.abandoned || held.forwardedAt !== null, 10_000);
    expect(held.abandoned).toBe(true);
    const first = await waitFor('A to delete its objects', async () => (await attemptsOf(jobId!)).find((x) => x.objectsCleared), 10_000);
    expect(first.attempt).toBe(1);
    expect(await objectsOf((await jobOf(versionId)).job.sceneHash)).toEqual([]);
    // The other owner's lease lapses; a worker claims the job again and finishes it.
    await t.m.db.db().update(bakeJobs).set({ leaseExpiresAt: new Date(Date.now() - 60_000) }).where(eq(bakeJobs.id, jobId!));
    startWorker();
    const done = await waitFor('the job to finish', async () => {
      const r = await jobOf(versionId);
      return r.job.state === 'done' || r.job.state === 'failed' ? r : null;
    });
    expect(done.job.state).toBe('done');
    const clip = await theOneClip(versionId);
    expect(await objectsOf(done.job.sceneHash)).toEqual([clip.storageKey, (clip.meta as { statsKey: string }).statsKey].sort());
  });

  it('SIGTERM mid-bake hands the job back: lease released, the attempt not counted, nothing left in the store', async () => {
    const a = startWorker();
    await workerReady(a);
    const versionId = await makeVersion(slowScene(40));
    const { jobId } = await t.m.queue.enqueueBake(versionId, t.studioId, t.userId);
    await waitFor('progress', async () => (await jobOf(versionId)).job.framesDone >= 2);
    await stopWorker(a, 'SIGTERM');
    expect(a.signalCode).toBeNull();
    expect(a.exitCode).toBe(0);
    const back = await jobOf(versionId);
    expect(back.job.state).toBe('queued');
    expect(back.job.attempts).toBe(0);
    expect(back.job.leaseOwner).toBeNull();
    expect(back.version.bakeState).toBe('queued');
    const [first] = await attemptsOf(jobId!);
    expect([first.state, first.objectsCleared]).toEqual(['released', true]);
    expect(await objectsOf(back.job.sceneHash)).toEqual([]);
  });
});
