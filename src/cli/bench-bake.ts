// Bake throughput: throwaway MariaDB + S3 stand-in, a batch of bakes, one standalone worker process with
// 1 and then 2 threads. Prints frames per second and jobs per minute for each, and a final JSON line.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { eq, inArray } from 'drizzle-orm';
import { freePort, migrate, startMariaDB, startS3, projectRoot as root } from './services';

const scratch = mkdtempSync(path.join(tmpdir(), 'tidemark-bench-'));
const JOBS = 4;

function benchScene(seed: number) {
  // A can falling into a pool, 1.6 m × 0.9 m at 1.25 cm cells (128 × 72), 36 frames at 25 fps.
  return {
    version: 1,
    tank: { width: 1.6, height: 0.9, cellSize: 0.0125, sides: { left: true, right: true, bottom: true, top: false } },
    timing: { fps: 25, startFrame: 1001, endFrame: 1036, substeps: 4 },
    physics: { seed },
    pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1.6, height: 0.45 } }],
    props: [
      {
        id: 'can',
        shape: { type: 'rect', x: 0.767, y: 0.74, width: 0.066, height: 0.122 },
        keys: [
          { frame: 1001, dx: 0, dy: 0, angle: 0 },
          { frame: 1017, dx: 0.04, dy: -0.55, angle: 35 },
        ],
      },
    ],
  };
}

async function main() {
  const db = await startMariaDB({ dataDir: path.join(scratch, 'db'), port: await freePort(), database: 'bench', user: 'bench', password: 'bench-only' });
  const s3 = await startS3({ dir: path.join(scratch, 's3'), port: await freePort(), bucket: 'bench', resetOnClose: true });
  try {
    await migrate(db.url);
    const env = {
      DATABASE_URL: db.url,
      S3_ENDPOINT: s3.endpoint,
      S3_BUCKET: 'bench',
      BAKE_POLL_MS: '100',
    };
    Object.assign(process.env, env);
    const { db: handle, closeDb } = await import('../lib/server/db');
    const schema = await import('../lib/server/db/schema');
    const { parseScene, sceneHash } = await import('../lib/scene');
    const { enqueueBake } = await import('../lib/bake/queue');
    const d = handle();
    const [studio] = await d.insert(schema.studios).values({ slug: 'bench', name: 'Bench' });
    const studioId = Number(studio.insertId);
    await d.insert(schema.users).values({ id: 'bench', email: 'bench@bench.example', name: 'Bench', passwordHash: 'x' });
    const [show] = await d.insert(schema.shows).values({ studioId, code: 'B', name: 'Bench' });
    const [shot] = await d.insert(schema.shots).values({ studioId, showId: Number(show.insertId), code: 'B_010', lastFrame: 1036 });
    const results: Record<string, unknown>[] = [];
    let seq = 0;
    for (const threads of [1, 2]) {
      const versionIds: number[] = [];
      for (let i = 0; i < JOBS; i++) {
        const parsed = parseScene(benchScene(++seq));
        if (!parsed.ok) throw new Error('bench scene invalid');
        const [v] = await d.insert(schema.versions).values({
          studioId,
          shotId: Number(shot.insertId),
          number: seq,
          scene: parsed.scene,
          sceneHash: sceneHash(parsed.scene).slice(0, 48) + randomBytes(8).toString('hex'),
        });
        versionIds.push(Number(v.insertId));
      }
      for (const id of versionIds) await enqueueBake(id, studioId, 'bench');
      const worker = spawn(path.join(root, 'node_modules/.bin/tsx'), ['src/cli/worker.ts'], {
        cwd: root,
        env: { ...process.env, ...env, BAKE_WORKERS: String(threads) },
        stdio: 'ignore',
        detached: true,
      });
      const t0 = performance.now();
      for (;;) {
        const jobs = await d.select().from(schema.bakeJobs).where(inArray(schema.bakeJobs.versionId, versionIds));
        if (jobs.every((j) => j.state === 'done' || j.state === 'failed')) {
          if (jobs.some((j) => j.state === 'failed')) throw new Error(`a bench bake failed: ${jobs.find((j) => j.error)?.error}`);
          break;
        }
        await new Promise((r) => setTimeout(r, 100));
      }
      const seconds = (performance.now() - t0) / 1000;
      process.kill(-worker.pid!, 'SIGTERM');
      const frames = JOBS * 36;
      const [{ count }] = await d
        .select({ count: schema.assets.byteSize })
        .from(schema.assets)
        .where(eq(schema.assets.versionId, versionIds[0]));
      const r = { threads, jobs: JOBS, frames, seconds: +seconds.toFixed(2), frames_per_s: +(frames / seconds).toFixed(2), jobs_per_min: +((JOBS / seconds) * 60).toFixed(2), clip_bytes: count };
      console.log(`bake: ${threads} worker thread(s): ${JOBS} bakes × 36 frames in ${r.seconds} s → ${r.frames_per_s} frames/s (includes worker start-up, ~1–2 s)`);
      results.push(r);
    }
    await closeDb();
    console.log(JSON.stringify({ bench: 'bake', scene: 'can into pool, 128×72 cells, ~18k particles, 36 frames', cores: (await import('node:os')).availableParallelism(), runs: results }));
  } finally {
    await s3.stop();
    await db.stop();
    rmSync(scratch, { recursive: true, force: true });
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
