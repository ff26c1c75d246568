// The demo studio's hero shot CNB_020 (src/lib/server/seed.ts): a free can dropped from the board splashes,
// plunges, bobs back up and floats. Baked here headless and read from the per-frame prop poses.
import { describe, it, expect } from 'vitest';
import { demoScene } from '../../src/lib/server/seed';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

describe('hero demo shot CNB_020', () => {
  it('the free can falls, splashes, plunges, bobs up and floats', () => {
    const scene = sceneFrom(demoScene('CNB_020', 24, 1001, 1084)!.scene);
    const can = scene.props[0];
    expect(can.motion).toBe('free');
    const sim = createSolver(scene);
    const water = 0.45; // the pool's depth (its pour), m
    const y0 = sim.stats().props[0].y;
    const ys: number[] = [];
    let splash = 0;
    while (sim.frame < scene.timing.endFrame) {
      const st = sim.stepFrame();
      ys.push(st.props[0].y);
      for (let k = 0; k < sim.count; k++) if (sim.y[k] > splash) splash = sim.y[k];
    }
    const low = Math.min(...ys), lowAt = ys.indexOf(low);
    // dropped from the board: starts 0.29 m above the water (bottom 0.74 m)
    expect(y0 - 0.061).toBeGreaterThan(water + 0.25);
    // splashes: liquid thrown at least 5 cm above the pool (common practice (no source): a visible splash)
    expect(splash).toBeGreaterThan(water + 0.05);
    // plunges: the centroid goes below the surface
    expect(low).toBeLessThan(water - 0.03);
    // bobs up: rises again by more than 3 cm after its lowest point
    expect(Math.max(...ys.slice(lowAt))).toBeGreaterThan(low + 0.03);
    // floats: over the last second the centroid stays within the can's half-height (0.061 m) of the surface
    // and never sinks to the floor (Archimedes: 400 kg/m³ floats with 40 % of its thickness under water)
    for (const y of ys.slice(-24)) expect(Math.abs(y - water)).toBeLessThan(0.061);
    const last = ys.slice(-24);
    expect(Math.max(...last) - Math.min(...last)).toBeLessThan(0.03);
  }, 180_000);
});
