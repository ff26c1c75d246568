// A blob away from every wall moves as one body: its centre of mass follows the ballistic path
// x = x0 + u0·t, y = y0 + v0·t − g·t²/2 (Newton's second law with uniform gravity; internal pressure
// forces cancel in the sum).
import { describe, it, expect } from 'vitest';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom, mean } from './helpers/scenes';

function blob(velocity: [number, number]) {
  return sceneFrom({
    version: 1,
    tank: { width: 2, height: 2, cellSize: 1 / 32 },
    timing: { fps: 24, startFrame: 1, endFrame: 12, substeps: 2 },
    physics: { seed: 3 },
    pours: [{ id: 'blob', shape: { type: 'circle', x: 0.6, y: 1.2, radius: 0.12 }, velocity }],
  });
}

describe('ballistic blob', () => {
  const g = 9.81; // m/s², the scene's gravity
  it.each([
    ['free-falling', [0, 0]],
    ['thrown', [1.5, 2.0]],
  ] as const)('%s blob: centre of mass follows x0 + u0·t, y0 + v0·t − g·t²/2 (Newton)', (_name, vel) => {
    const sim = createSolver(blob([vel[0], vel[1]]));
    const x0 = mean(sim.x), y0 = mean(sim.y);
    let dtMax = 0;
    for (let f = 1; f <= 10; f++) {
      const st = sim.stepFrame();
      const t = st.time;
      dtMax = Math.max(dtMax, 1 / 24 / st.substeps);
      const xe = x0 + vel[0] * t, ye = y0 + vel[1] * t - 0.5 * g * t * t;
      // Allowed error: the first-order lag of position-first symplectic Euler, g·t·dt/2 (Hairer, Lubich &
      // Wanner, "Geometric Numerical Integration", 2006: the method is order 1), plus 1 mm; the drop over
      // 0.42 s is 0.85 m, so a spurious force of a few percent of g would fail.
      const tol = (g * t * dtMax) / 2 + 1e-3;
      expect(Math.abs(mean(sim.x) - xe)).toBeLessThan(2e-3); // no force along x: 2 mm, 1/15 of a cell, over 0.6 m of travel
      expect(Math.abs(mean(sim.y) - ye)).toBeLessThan(tol);
    }
  });
});
