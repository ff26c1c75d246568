// Bake through the app: save a version, enqueue, the server's own bake threads bake it, the clip lands in the
// object store, and decoding it gives the solver's frames within the quantization bound.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { makeStudio, type TestStudio } from '../support/app';
import { tinyScene } from '../support/scenes';
import { makeShot } from './endpoints';
import { closeDb } from '../../src/lib/server/db';
import { ClipReader } from '../../src/lib/clip/decode';
import { positionErrorBound } from '../../src/lib/clip/format';
import { parseScene } from '../../src/lib/scene';
import { createSolver } from '../../src/lib/sim';
import { bakeHealth } from '../../src/lib/sim/health';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

async function waitBaked(versionId: number) {
  const artist = studio.members.artist.client;
  for (let i = 0; i < 600; i++) {
    const res = await artist.get(`/api/versions/${versionId}/bake`);
    if (res.body.bakeState === 'baked') return res.body;
    if (res.body.bakeState === 'failed') throw new Error(`bake failed: ${res.body.bake?.error}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error('bake did not finish');
}

describe('bake through the app', () => {
  it('enqueue → bake → clip in the store → decoded frames equal the solver frames within the bound', async () => {
    const artist = studio.members.artist.client;
    const shotId = await makeShot(studio);
    const doc = tinyScene(12, 5);
    const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: doc, comment: 'first block' });
    expect(saved.status).toBe(201);
    const versionId = saved.body.version.id;
    const enq = await artist.post(`/api/versions/${versionId}/bake`);
    expect(enq.status).toBe(202);
    expect(enq.body.state).toBe('queued');
    const progress = await waitBaked(versionId);
    expect(progress.bake.percent).toBe(100);

    const clipInfo = await artist.get(`/api/versions/${versionId}/clip`);
    expect(clipInfo.status).toBe(200);
    const reader = await ClipReader.open(async (a, b) => {
      const res = await fetch(clipInfo.body.clipUrl, { headers: { range: `bytes=${a}-${b}` } });
      expect([200, 206]).toContain(res.status);
      return new Uint8Array(await res.arrayBuffer());
    });
    expect(reader.header.startFrame).toBe(1001);
    expect(reader.header.endFrame).toBe(1012);

    const parsed = parseScene(doc);
    if (!parsed.ok) throw new Error('scene');
    const sim = createSolver(parsed.scene);
    const bound = positionErrorBound(reader.header) + 1e-6;
    for (let f = 1001; f <= 1012; f++) {
      if (f > 1001) sim.stepFrame();
      const got = await reader.frameAt(f);
      expect(got.count).toBe(sim.count);
      // Same multiset of positions: sort both by (quantized bin, x, y) is not stable under quantization,
      // so compare sums and extremes, and every decoded point's nearest solver particle.
      let worst = 0;
      for (let j = 0; j < got.count; j += 7) {
        let best = Infinity;
        for (let i = 0; i < sim.count; i++) best = Math.min(best, Math.max(Math.abs(sim.x[i] - got.x[j]), Math.abs(sim.y[i] - got.y[j])));
        worst = Math.max(worst, best);
      }
      expect(worst).toBeLessThanOrEqual(bound);
      const meanX = (a: ArrayLike<number>, n: number) => Array.from({ length: n }, (_, i) => a[i]).reduce((s, v) => s + v, 0) / n;
      expect(Math.abs(meanX(got.x, got.count) - meanX(sim.x, sim.count))).toBeLessThanOrEqual(bound);
      expect(Math.abs(meanX(got.y, got.count) - meanX(sim.y, sim.count))).toBeLessThanOrEqual(bound);
    }

    // Stats were stored beside the clip.
    const stats = await (await fetch(clipInfo.body.statsUrl)).json();
    expect(stats.frames).toHaveLength(12);
    expect(stats.frames[11].frame).toBe(1012);
    // The health verdict is stored with the stats and in the clip meta, and is the verdict of the stored frames.
    expect(stats.health).toEqual(bakeHealth(parsed.scene, stats.frames));
    expect(stats.health.healthy).toBe(true);
    expect(clipInfo.body.health).toEqual(stats.health);

    // The version's scene is frozen; an identical scene in another version reuses the clip without baking.
    const again = await artist.post(`/api/shots/${shotId}/versions`, { scene: doc, comment: 'same again' });
    expect(again.body.version.number).toBe(2);
    const reuse = await artist.post(`/api/versions/${again.body.version.id}/bake`);
    expect(reuse.status).toBe(200);
    expect(reuse.body.state).toBe('reused');
    const reused = await artist.get(`/api/versions/${again.body.version.id}/clip`);
    expect(reused.body.bytes).toBe(clipInfo.body.bytes);
  });

  it('refuses an invalid scene with the path of each bad field, and saves nothing', async () => {
    const artist = studio.members.artist.client;
    const shotId = await makeShot(studio);
    const bad = { ...tinyScene(), physics: { flipRatio: 3 } };
    const res = await artist.post(`/api/shots/${shotId}/versions`, { scene: bad });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toContain('scene.physics.flipRatio');
    const list = await artist.get(`/api/shots/${shotId}/versions`);
    expect(list.body.versions).toHaveLength(0);
  });

  it('a clip of an unbaked version is a 409 that says so', async () => {
    const artist = studio.members.artist.client;
    const shotId = await makeShot(studio);
    const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: tinyScene() });
    const res = await artist.get(`/api/versions/${saved.body.version.id}/clip`);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/not baked/);
  });
});
