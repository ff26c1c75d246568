// Flow checks: area conservation while sloshing, the dam-break front against Ritter's bound,
// solids (no NaN, no particle deep inside a wall or prop), a dropped prop displacing water.
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

describe('sloshing', () => {
  it('liquid area (½ρ₀ iso-contour) stays within 3 % over 4 s of sloshing (common practice for FLIP, no source)', () => {
    const sim = createSolver(sceneFrom({
      version: 1, tank: { width: 1, height: 0.5, cellSize: 1 / 32 },
      timing: { fps: 24, startFrame: 1, endFrame: 97, substeps: 2 }, physics: { seed: 11 },
      pours: [{ id: 'slab', shape: { type: 'rect', x: 0, y: 0, width: 0.4, height: 0.3 } }],
    }));
    const count0 = sim.count;
    const geometric = 0.4 * 0.3; // m², the poured rectangle
    // the seeded state reads its rectangle (marching squares at the seeded density)
    expect(Math.abs(sim.stats().liquidArea - geometric) / geometric).toBeLessThan(0.02);
    // Reference: the first frame. In it the separation spreads the 2 × 2-per-cell seeding (spacing h/2)
    // towards its contact distance 2r = 0.6h, and ρ₀ is fixed after that step (measured: +4.2 % over the
    // rectangle with this seed). A regression guard on that expansion, not a physical bound:
    const first = sim.stepFrame();
    expect(Math.abs(first.liquidArea - geometric) / geometric).toBeLessThan(0.06);
    let maxSpeed = 0, drift = 0;
    for (let f = 1; f < 96; f++) {
      const st = sim.stepFrame();
      maxSpeed = Math.max(maxSpeed, st.maxSpeed);
      drift = Math.max(drift, Math.abs(st.liquidArea - first.liquidArea) / first.liquidArea);
    }
    expect(drift).toBeLessThan(0.03); // measured 1.4 %
    expect(sim.count).toBe(count0); // closed tank: nothing lost
    expect(maxSpeed).toBeGreaterThan(1); // it did slosh
  });
});

describe('dam break', () => {
  it("front never outruns Ritter's dry-bed bound 2·√(g·H) (Ritter 1892), and does move", () => {
    const H = 0.3, g = 9.81;
    const sim = createSolver(sceneFrom({
      version: 1, tank: { width: 2, height: 0.5, cellSize: 1 / 64 },
      timing: { fps: 60, startFrame: 0, endFrame: 30, substeps: 2 }, physics: { seed: 4 },
      pours: [{ id: 'column', shape: { type: 'rect', x: 0, y: 0, width: 0.3, height: H } }],
    }));
    const front = () => { let m = -Infinity; for (const x of sim.x) m = Math.max(m, x); return m; };
    const x0 = front();
    const c = 2 * Math.sqrt(g * H); // Ritter (1892): front speed of a dam break on a dry bed
    let last = x0;
    for (let f = 0; f < 18; f++) {
      const st = sim.stepFrame();
      last = front();
      // allowance: the particle radius plus half a cell for where the rightmost particle sits (common practice, no source)
      expect(last).toBeLessThanOrEqual(x0 + c * st.time + 0.5 / 64 + 0.3 / 64);
    }
    // after 0.3 s the front has covered at least a third of Ritter's distance (measured fronts run at roughly
    // half to two thirds of it, from memory: Martin & Moyce 1952)
    expect(last - x0).toBeGreaterThan((c * 0.3) / 3);
  });
});

function coarseExample() {
  const doc = JSON.parse(readFileSync(new URL('../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));
  doc.tank.cellSize = 1 / 32;
  return sceneFrom(doc);
}

describe('solids', () => {
  it('example scene: no NaN ever, no particle inside a wall or prop beyond half a cell', () => {
    const scene = coarseExample();
    const sim = createSolver(scene);
    const h = scene.tank.cellSize;
    let removed = false;
    const count0 = sim.count;
    for (let f = 0; f < 47; f++) {
      sim.stepFrame();
      for (let i = 0; i < sim.count; i++) {
        const x = sim.x[i], y = sim.y[i];
        expect(Number.isFinite(x) && Number.isFinite(y) && Number.isFinite(sim.u[i]) && Number.isFinite(sim.v[i])).toBe(true);
        expect(sim.solidDistance(x, y)).toBeGreaterThan(-h / 2);
        expect(x >= 0 && x <= scene.tank.width && y >= 0 && y <= scene.tank.height).toBe(true);
      }
      if (sim.count < count0) removed = true;
    }
    expect(removed).toBe(true); // the drain works
  });

  it('a prop dropped into a pool raises the free surface beside it', () => {
    const base = {
      version: 1, tank: { width: 1, height: 0.6, cellSize: 1 / 40 },
      timing: { fps: 24, startFrame: 1, endFrame: 20, substeps: 2 }, physics: { seed: 9 },
      pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1, height: 0.2 } }],
    };
    const withProp = { ...base, props: [{ id: 'block', shape: { type: 'rect', x: 0.4, y: 0.4, width: 0.2, height: 0.12 },
      keys: [{ frame: 1, dx: 0, dy: 0, angle: 0 }, { frame: 7, dx: 0, dy: -0.33, angle: 0 }] }] };
    const surfaceBeside = (doc: unknown) => {
      const sim = createSolver(sceneFrom(doc));
      for (let f = 0; f < 9; f++) sim.stepFrame();
      // highest liquid within 0.1 m to either side of the block
      let top = 0;
      for (let i = 0; i < sim.count; i++) {
        const x = sim.x[i];
        if ((x > 0.3 && x < 0.4) || (x > 0.6 && x < 0.7)) top = Math.max(top, sim.y[i]);
      }
      return top;
    };
    const still = surfaceBeside(base), displaced = surfaceBeside(withProp);
    // the block sinks 0.09 m into the pool over 0.2 m of width: at least a cell of rise is expected
    expect(displaced - still).toBeGreaterThan(1 / 40);
  });
});
