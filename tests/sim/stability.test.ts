// Bakes that used to blow up stay bounded: a box crashing into a pool at 13 m/s (the editor's "Crash" preset with the
// timing helper's keys) and a 12 m/s spout into a closed pool at the ends of the accepted parameter ranges.
// Bound, from the acceptance (no published source): no particle faster than 5 × the fastest driver (prop
// impact or spout speed) and at most 5 % of the liquid leaving through the open top.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseScene } from '../../src/lib/scene';
import { createSolver, type FrameStats } from '../../src/lib/sim';
import { bakeHealth } from '../../src/lib/sim/health';

function bake(doc: unknown) {
  const r = parseScene(doc);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  const s = createSolver(r.scene);
  const start = s.count;
  let peak = 0, maxCount = start;
  const frames: FrameStats[] = [];
  while (s.frame < r.scene.timing.endFrame) {
    const st = s.stepFrame();
    frames.push(st);
    peak = Math.max(peak, st.maxSpeed);
    maxCount = Math.max(maxCount, st.count);
  }
  let above = 0;
  for (let p = 0; p < s.count; p++) if (s.y[p] > r.scene.tank.height) above++;
  return { scene: r.scene, solver: s, peak, start, maxCount, above, health: bakeHealth(r.scene, frames) };
}

describe('stable bakes', () => {
  it('the box crash bakes to its last frame with bounded speeds and its liquid kept', () => {
    const doc = JSON.parse(readFileSync(new URL('../fixtures/scenes/box-crash.json', import.meta.url), 'utf8'));
    const { scene, solver, peak, start, above, health } = bake(doc);
    // impact speed: the keys' fastest frame-to-frame drop (Newton's v = g·t from the timing helper, ≈ 13 m/s)
    const keys = scene.props[0].keys;
    let impact = 0;
    for (let k = 1; k < keys.length; k++) impact = Math.max(impact, Math.abs(keys[k].dy - keys[k - 1].dy) * scene.timing.fps / (keys[k].frame - keys[k - 1].frame));
    expect(impact).toBeGreaterThan(12);
    expect(solver.frame).toBe(scene.timing.endFrame);
    expect(peak).toBeLessThan(5 * impact);
    // liquid kept: particles still in the tank (none removed, fewer than 5 % above the open top)
    expect(solver.count).toBeGreaterThanOrEqual(0.95 * start);
    expect(above).toBeLessThanOrEqual(0.05 * solver.count);
    // and the solver's own verdict agrees (src/lib/sim/health.ts)
    expect(health.findings).toEqual([]);
  }, 120_000);

  const spoutScene = (flipRatio: number, driftCorrection: number, cfl: number, substeps: number) => ({
    version: 1,
    tank: { width: 4, height: 2, cellSize: 0.05, sides: { left: true, right: true, bottom: true, top: true } },
    timing: { fps: 24, startFrame: 1001, endFrame: 1048, substeps },
    physics: { flipRatio, driftCorrection, cfl },
    pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 4, height: 0.6 }, velocity: [0, 0] }],
    spouts: [{ id: 'jet', shape: { type: 'circle', x: 1, y: 1.5, radius: 0.08 }, velocity: [0, -12], startFrame: 1001, endFrame: 1024 }],
  });

  it.each([
    [0.99, 2, 1, 5],
    [1, 2, 1, 5],
    [1, 2, 10, 1],
    [0, 2, 10, 1],
    [1, 0, 10, 1],
  ])('a 12 m/s spout into a pool at flip ratio %s, drift correction %s, CFL %s, %s substeps stays bounded', (flip, drift, cfl, substeps) => {
    const { solver, peak, maxCount, above, health } = bake(spoutScene(flip, drift, cfl, substeps));
    expect(health.findings).toEqual([]);
    expect(solver.frame).toBe(1048);
    expect(peak).toBeLessThan(5 * 12);
    // closed tank, no drain: every particle emitted stays in the tank (5 % allowance as above)
    expect(solver.count).toBeGreaterThanOrEqual(0.95 * maxCount);
    expect(above).toBe(0);
  }, 60_000);

  it('refuses drift corrections and CFL limits with no stable meaning, naming the field', () => {
    const r = parseScene(spoutScene(0.9, 3, 1, 5));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((e) => e.path)).toContain('physics.driftCorrection');
    const r2 = parseScene(spoutScene(0.9, 1, 50, 5));
    expect(r2.ok).toBe(false);
    if (!r2.ok) expect(r2.errors.map((e) => e.path)).toContain('physics.cfl');
  });
});
