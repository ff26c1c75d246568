// Isolation: the test app bakes nothing itself (no BAKE_WORKERS), its bake worker process does, so a bake at the
// studio's cost limit leaves the web server's memory where it was (RSS of the web process, within 50 MB).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { eq } from 'drizzle-orm';
import { makeStudio, type TestStudio } from '../support/app';
import { makeShot } from './endpoints';
import { tinyScene } from '../support/scenes';
import { closeDb, db } from '../../src/lib/server/db';
import { studios } from '../../src/lib/server/db/schema';
import { parseScene } from '../../src/lib/scene';
import { bakeCost } from '../../src/lib/scene/cost';

/** Resident set size of a process, MB (Linux /proc). */
function rssMb(pid: number): number {
  const m = readFileSync(`/proc/${pid}/status`, 'utf8').match(/VmRSS:\s+(\d+) kB/);
  if (!m) throw new Error(`no VmRSS for process ${pid}`);
  return Number(m[1]) / 1024;
}

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

describe('bake isolation', () => {
  it("a bake at the studio's cost limit leaves the web server's RSS unchanged within 50 MB", async () => {
    const webPid = Number(process.env.TEST_APP_PID);
    const workerPid = Number(process.env.TEST_BAKE_WORKER_PID);
    expect(webPid).toBeGreaterThan(0);
    // A 128 × 128 grid with a deep block of liquid (≈ 27 000 particles), 16 frames.
    const doc = {
      version: 1,
      tank: { width: 1, height: 1, cellSize: 1 / 128 },
      timing: { fps: 24, startFrame: 1001, endFrame: 1016, substeps: 2 },
      physics: { seed: 4 },
      pours: [{ id: 'block', shape: { type: 'rect', x: 0, y: 0, width: 0.6, height: 0.7 }, velocity: [0, 0] }],
    };
    const parsed = parseScene(doc);
    if (!parsed.ok) throw new Error('scene invalid');
    // The studio's limit is exactly this bake's cost: the bake is at the limit and is accepted.
    await db().update(studios).set({ bakeCostLimit: bakeCost(parsed.scene).total }).where(eq(studios.id, studio.id));
    const artist = studio.members.artist.client;
    const shotId = await makeShot(studio);
    const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: doc });
    expect(saved.status).toBe(201);
    const versionId = saved.body.version.id;

    // Warm the web server's bake routes first (a route's first answer loads its code), with a tiny bake.
    const warm = await artist.post(`/api/shots/${shotId}/versions`, { scene: tinyScene(4) });
    await artist.post(`/api/versions/${warm.body.version.id}/bake`);
    for (let i = 0; i < 600 && (await artist.get(`/api/versions/${warm.body.version.id}/bake`)).body.bakeState !== 'baked'; i++) {
      await new Promise((r) => setTimeout(r, 250));
    }

    const webBefore = rssMb(webPid);
    const workerBefore = workerPid ? rssMb(workerPid) : 0;
    let webPeak = webBefore;
    let workerPeak = workerBefore;
    const enq = await artist.post(`/api/versions/${versionId}/bake`);
    expect(enq.status).toBe(202);
    let state = '';
    for (let i = 0; i < 1200 && state !== 'baked' && state !== 'failed'; i++) {
      await new Promise((r) => setTimeout(r, 250));
      webPeak = Math.max(webPeak, rssMb(webPid));
      if (workerPid) workerPeak = Math.max(workerPeak, rssMb(workerPid));
      state = (await artist.get(`/api/versions/${versionId}/bake`)).body.bakeState;
    }
    expect(state).toBe('baked');
    const webAfter = rssMb(webPid);
    console.log(
      `web server RSS: ${webBefore.toFixed(1)} MB before, ${webPeak.toFixed(1)} MB peak, ${webAfter.toFixed(1)} MB after; ` +
        `bake worker process RSS: ${workerBefore.toFixed(1)} MB before, ${workerPeak.toFixed(1)} MB peak`,
    );
    expect(webPeak - webBefore).toBeLessThan(50);
    expect(Math.abs(webAfter - webBefore)).toBeLessThan(50);
  }, 300_000);
});
