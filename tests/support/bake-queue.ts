// Test support for the bake queue: a database of its own (so the test app's bake worker never takes these jobs),
// bake worker processes (`src/cli/worker.ts`) started and stopped by the test, and versions made to order.
import { beforeAll, afterAll, afterEach } from 'vitest';
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import path from 'node:path';
import { eq, and, inArray } from 'drizzle-orm';
import { migrate } from '../../src/cli/services';

const root = path.resolve(__dirname, '../..');

export interface QueueTest {
  m: {
    db: typeof import('../../src/lib/server/db');
    schema: typeof import('../../src/lib/server/db/schema');
    queue: typeof import('../../src/lib/bake/queue');
    scene: typeof import('../../src/lib/scene');
  };
  studioId: number;
  userId: string;
}

/** Registers the hooks that make the queue database and stop the workers; returns the loaded modules and helpers. */
export function useQueueDatabase(workerEnv: Record<string, string>) {
  const queueDbName = `queue_${Date.now()}_${randomBytes(2).toString('hex')}`;
  const url = new URL(process.env.DATABASE_URL!);
  url.pathname = `/${queueDbName}`;
  const rootSql = (q: string) => execFileSync('mariadb', ['--no-defaults', `--socket=${process.env.TEST_DB_ROOT_SOCKET}`, '-uroot', '-e', q]);
  const env = { DATABASE_URL: url.toString(), ...workerEnv };
  const t = {} as QueueTest;
  const workers: ChildProcess[] = [];

  beforeAll(async () => {
    rootSql(`CREATE DATABASE ${queueDbName}; GRANT ALL ON ${queueDbName}.* TO 'tidemark'@'127.0.0.1';`);
    await migrate(url.toString());
    // Loaded after DATABASE_URL points at the queue database.
    Object.assign(process.env, env);
    t.m = {
      db: await import('../../src/lib/server/db'),
      schema: await import('../../src/lib/server/db/schema'),
      queue: await import('../../src/lib/bake/queue'),
      scene: await import('../../src/lib/scene'),
    };
    const { studios, users } = t.m.schema;
    const [s] = await t.m.db.db().insert(studios).values({ slug: 'queue-test', name: 'Queue test' });
    t.studioId = Number(s.insertId);
    t.userId = 'queue-user';
    await t.m.db.db().insert(users).values({ id: t.userId, email: 'q@test.example', name: 'Q', passwordHash: 'x' });
  });
  afterEach(async () => {
    await Promise.all(workers.splice(0).map((w) => stopWorker(w)));
  });
  afterAll(async () => {
    await t.m?.db.closeDb();
    rootSql(`DROP DATABASE IF EXISTS ${queueDbName}`);
  });

  /** Starts a bake worker process with `threads` slots; its output goes to TEST_SCRATCH/worker-<pid>.log. */
  function startWorker(extraEnv: Record<string, string> = {}, threads = 1): ChildProcess {
    // Node with tsx's loader, as `npm start` runs it: the tsx launcher relays SIGTERM and, when the child does not
    // acknowledge within 30 ms (a loaded machine), kills it and exits 143, which is not the worker's own hand-back.
    const child = spawn(process.execPath, ['--import', 'tsx', 'src/cli/worker.ts'], {
      cwd: root,
      env: { ...process.env, ...env, BAKE_WORKERS: String(threads), ...extraEnv },
      stdio: ['ignore', 'pipe', 'pipe'],
      detached: true,
    });
    const log = createWriteStream(path.join(process.env.TEST_SCRATCH ?? '/tmp', `worker-${child.pid}.log`));
    child.stdout!.pipe(log);
    child.stderr!.pipe(log);
    workers.push(child);
    return child;
  }

  let shotSeq = 0;
  /** A version of the scene, with a unique scene hash so identical scenes are baked, not reused. */
  async function makeVersion(doc: unknown): Promise<number> {
    const { shows, shots, versions } = t.m.schema;
    const d = t.m.db.db();
    const parsed = t.m.scene.parseScene(doc);
    if (!parsed.ok) throw new Error('bad scene');
    const [show] = await d.insert(shows).values({ studioId: t.studioId, code: `Q${++shotSeq}`, name: 'q' });
    const [shot] = await d.insert(shots).values({ studioId: t.studioId, showId: Number(show.insertId), code: `S${shotSeq}`, lastFrame: 1100 });
    const [v] = await d.insert(versions).values({
      studioId: t.studioId,
      shotId: Number(shot.insertId),
      number: 1,
      scene: parsed.scene,
      sceneHash: `${t.m.scene.sceneHash(parsed.scene).slice(0, 50)}${randomBytes(7).toString('hex')}`,
    });
    return Number(v.insertId);
  }

  async function jobOf(versionId: number) {
    const [job] = await t.m.db.db().select().from(t.m.schema.bakeJobs).where(eq(t.m.schema.bakeJobs.versionId, versionId));
    const [version] = await t.m.db.db().select().from(t.m.schema.versions).where(eq(t.m.schema.versions.id, versionId));
    return { job, version };
  }

  async function claimsOf(jobIds: number[]) {
    const { auditLog } = t.m.schema;
    return t.m.db.db()
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'bake.claim'), inArray(auditLog.targetId, jobIds.map(String))));
  }

  return { t, startWorker, makeVersion, jobOf, claimsOf };
}

/** Resolves once the worker's slots are polling the queue (their start has been logged, or 10 s passed). */
export function workerReady(child: ChildProcess): Promise<void> {
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

/** Stops a worker (SIGTERM hands its job back); one that hangs is killed after a grace period. */
export function stopWorker(child: ChildProcess, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
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

export async function waitFor<T>(what: string, fn: () => Promise<T | undefined | null | false>, timeoutMs = 60_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
