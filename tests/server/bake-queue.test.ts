// The bake queue with real worker processes (`npm run worker`) against MariaDB and the S3 stand-in.
// These tests use a database of their own, so the app server's bake threads never take their jobs.
import { describe, it, expect, beforeAll, afterAll, afterEach } from 'vitest';
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import { createServer, type Server } from 'node:net';
import { randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import path from 'node:path';
import { eq, and, inArray } from 'drizzle-orm';
import { migrate } from '../../src/cli/services';
import { tinyScene, slowScene } from '../support/scenes';

const root = path.resolve(__dirname, '../..');
const queueDbName = `queue_${Date.now()}_${randomBytes(2).toString('hex')}`;
const url = new URL(process.env.DATABASE_URL!);
url.pathname = `/${queueDbName}`;
const rootSql = (q: string) => execFileSync('mariadb', ['--no-defaults', `--socket=${process.env.TEST_DB_ROOT_SOCKET}`, '-uroot', '-e', q]);

const workerEnv = {
  DATABASE_URL: url.toString(),
  BAKE_LEASE_MS: '3000',
  BAKE_POLL_MS: '100',
  BAKE_RETRY_DELAY_MS: '200',
  BAKE_MAX_ATTEMPTS: '3',
};

// Loaded after DATABASE_URL points at the queue database.
let m: {
  db: typeof import('../../src/lib/server/db');
  schema: typeof import('../../src/lib/server/db/schema');
  queue: typeof import('../../src/lib/bake/queue');
  scene: typeof import('../../src/lib/scene');
};
let studioId = 0;
let userId = '';

beforeAll(async () => {
  rootSql(`CREATE DATABASE ${queueDbName}; GRANT ALL ON ${queueDbName}.* TO 'tidemark'@'127.0.0.1';`);
  await migrate(url.toString());
  Object.assign(process.env, workerEnv);
  m = {
    db: await import('../../src/lib/server/db'),
    schema: await import('../../src/lib/server/db/schema'),
    queue: await import('../../src/lib/bake/queue'),
    scene: await import('../../src/lib/scene'),
  };
  const { studios, users } = m.schema;
  const [s] = await m.db.db().insert(studios).values({ slug: 'queue-test', name: 'Queue test' });
  studioId = Number(s.insertId);
  userId = 'queue-user';
  await m.db.db().insert(users).values({ id: userId, email: 'q@test.example', name: 'Q', passwordHash: 'x' });
});

const workers: ChildProcess[] = [];
afterEach(async () => {
  await Promise.all(workers.splice(0).map((w) => stopWorker(w)));
});
afterAll(async () => {
  await m?.db.closeDb();
  rootSql(`DROP DATABASE IF EXISTS ${queueDbName}`);
});

function startWorker(extraEnv: Record<string, string> = {}, threads = 1): ChildProcess {
  const child = spawn(path.join(root, 'node_modules/.bin/tsx'), ['src/cli/worker.ts'], {
    cwd: root,
    env: { ...process.env, ...workerEnv, BAKE_WORKERS: String(threads), ...extraEnv },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  });
  // Keep each worker's output for a failing test to show.
  const log = createWriteStream(path.join(process.env.TEST_SCRATCH ?? '/tmp', `worker-${child.pid}.log`));
  child.stdout!.pipe(log);
  child.stderr!.pipe(log);
  workers.push(child);
  return child;
}

/** Resolves once the worker's threads are polling the queue (their first empty poll has been logged or 10 s passed). */
function workerReady(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    const timer = setTimeout(resolve, 10_000);
    const onData = (d: Buffer) => {
      if (/thread\(s\) started/.test(d.toString())) {
        clearTimeout(timer);
        child.stdout!.off('data', onData);
        // Threads load the solver after the pool announces them.
        setTimeout(resolve, 1500);
      }
    };
    child.stdout!.on('data', onData);
  });
}

function stopWorker(child: ChildProcess, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    // A worker stopping hands its job back and exits; one that hangs is killed after a grace period.
    const timer = setTimeout(() => {
      try {
        process.kill(-child.pid!, 'SIGKILL');
      } catch {
        /* gone */
      }
    }, 15_000);
    child.once('exit', () => {
      clearTimeout(timer);
      resolve();
    });
    try {
      process.kill(-child.pid!, signal);
    } catch {
      clearTimeout(timer);
      resolve();
    }
  });
}

let shotSeq = 0;
async function makeVersion(doc: unknown): Promise<number> {
  const { shows, shots, versions } = m.schema;
  const d = m.db.db();
  const parsed = m.scene.parseScene(doc);
  if (!parsed.ok) throw new Error('bad scene');
  const [show] = await d.insert(shows).values({ studioId, code: `Q${++shotSeq}`, name: 'q' });
  const [shot] = await d.insert(shots).values({ studioId, showId: Number(show.insertId), code: `S${shotSeq}`, lastFrame: 1100 });
  const [v] = await d.insert(versions).values({
    studioId,
    shotId: Number(shot.insertId),
    number: 1,
    scene: parsed.scene,
    // A unique hash per version so identical scenes are baked, not reused, in these tests.
    sceneHash: `${m.scene.sceneHash(parsed.scene).slice(0, 50)}${randomBytes(7).toString('hex')}`,
  });
  return Number(v.insertId);
}

async function jobOf(versionId: number) {
  const [job] = await m.db.db().select().from(m.schema.bakeJobs).where(eq(m.schema.bakeJobs.versionId, versionId));
  const [version] = await m.db.db().select().from(m.schema.versions).where(eq(m.schema.versions.id, versionId));
  return { job, version };
}

async function waitFor<T>(what: string, fn: () => Promise<T | undefined | null | false>, timeoutMs = 60_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function claimsOf(jobIds: number[]) {
  const { auditLog } = m.schema;
  const rows = await m.db.db()
    .select()
    .from(auditLog)
    .where(and(eq(auditLog.action, 'bake.claim'), inArray(auditLog.targetId, jobIds.map(String))));
  return rows;
}

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
    for (const id of versionIds) jobIds.push((await m.queue.enqueueBake(id, studioId, userId)).jobId!);
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
    const { jobId } = await m.queue.enqueueBake(versionId, studioId, userId);
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
      await m.queue.enqueueBake(versionId, studioId, userId);
      startWorker({ S3_ENDPOINT: `http://127.0.0.1:${port}` });
      const failed = await waitFor('the job to fail', async () => {
        const r = await jobOf(versionId);
        return r.job.state === 'failed' ? r : null;
      });
      expect(failed.job.attempts).toBe(3);
      expect(failed.job.error).toMatch(/Bake failed after 3 attempt\(s\): could not reach the object store/);
      expect(failed.version.bakeState).toBe('failed');
      expect(failed.version.clipAssetId).toBeNull();
      const clips = await m.db.db().select().from(m.schema.assets).where(eq(m.schema.assets.versionId, versionId));
      expect(clips).toHaveLength(0);
    } finally {
      dropper.close();
    }
  });

  it('cancel stops a bake mid-way', async () => {
    const versionId = await makeVersion(slowScene(80));
    await m.queue.enqueueBake(versionId, studioId, userId);
    startWorker();
    await waitFor('progress', async () => (await jobOf(versionId)).job.framesDone >= 2);
    expect(await m.queue.cancelBake(versionId, studioId, userId)).toBe('cancelling');
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
    await m.queue.enqueueBake(queued, studioId, userId);
    expect(await m.queue.cancelBake(queued, studioId, userId)).toBe('cancelled');
    expect((await jobOf(queued)).version.bakeState).toBe('cancelled');

    const bad = await makeVersion(tinyScene(4));
    // Damage the stored scene behind the API's back: the worker must refuse it with the validation message.
    await m.db.db().update(m.schema.versions).set({ scene: { version: 1, tank: { width: -1 } } }).where(eq(m.schema.versions.id, bad));
    await m.queue.enqueueBake(bad, studioId, userId);
    startWorker();
    const r = await waitFor('the invalid scene to fail', async () => {
      const x = await jobOf(bad);
      return x.job.state === 'failed' ? x : null;
    });
    expect(r.job.attempts).toBe(1);
    expect(r.job.error).toMatch(/The scene is not valid: .*tank/);
  });
});
