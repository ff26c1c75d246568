// A settled tank: pressure at depth d equals ρ·g·d (Pascal's law, hydrostatics), ρ = 1000 kg/m³ (handbook value).
import { describe, it, expect } from 'vitest';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

// Density of fresh water, kg/m³: 999.97 at 4 °C, 998.2 at 20 °C (CRC Handbook of Chemistry and Physics, from
// memory), taken as 1000 — within 0.2 %, well inside the 2 % the pressures below are held to. The solver's own
// constant is not used here, so a wrong one fails Pascal's law.
const RHO_WATER = 1000;

function settledTank(cellSize = 1 / 128) {
  const depth = 0.5;
  const sim = createSolver(sceneFrom({
    version: 1,
    tank: { width: 0.25, height: 0.625, cellSize },
    timing: { fps: 24, startFrame: 1001, endFrame: 1048, substeps: 4 },
    physics: { seed: 5 }, // default solver settings: CG + MIC(0) at 1e-2, drift correction k = 1
    pours: [{ id: 'still', shape: { type: 'rect', x: 0, y: 0, width: 0.25, height: depth } }],
  }));
  return { sim, depth };
}

describe('hydrostatic pressure', () => {
  it('settled tank at 1/64 m cells, default settings (drift correction on): p(d) = ρ·g·d within 2 % (Pascal)', () => {
    const { sim, depth } = settledTank(1 / 64);
    const g = 9.81, width = 0.25;
    // Depths of 0.25–0.45 m. The free surface is a ghost-fluid boundary (Gibou, Fedkiw, Cheng & Kang 2002;
    // Enright, Nguyen, Gibou & Fedkiw 2003): p = 0 where the ½ρ₀ density contour crosses the cell line, not
    // at the first air cell's centre. Measured: p/(ρ·g·d) = 0.999, 0.999, 0.997 at d ≈ 0.45, 0.35, 0.25 m
    // with h = 1/64 m (1.045, 1.056, 1.078 with the earlier first-order boundary, p = 0 at the air cell's centre).
    // The pressure is the one the step applied; the drift correction is a displacement of its own
    // (stages.ts, gridToParticles) and never enters it.
    const heights = [0.05, 0.15, 0.25];
    const mean = heights.map(() => 0);
    let surface = 0;
    // settle for 1.5 s, then average over the next 0.5 s (FLIP pressure is noisy step to step)
    for (let f = 0; f < 48; f++) {
      const st = sim.stepFrame();
      if (f >= 36) {
        heights.forEach((y, k) => { mean[k] += sim.pressureAt(0.125, y) / 12; });
        // The free surface: the level of the ½ρ₀ iso-contour of the particle density, i.e. the liquid area
        // (marching squares, the FrameStats measure) over the tank width. The liquid spans the whole width,
        // so this is the mean height of that contour.
        surface += st.liquidArea / width / 12;
      }
    }
    expect(Math.abs(surface - depth)).toBeLessThan(0.1 * depth); // the tank stays put
    heights.forEach((y, k) => {
      const expected = RHO_WATER * g * (surface - y); // Pascal's law
      expect(Math.abs(mean[k] - expected) / expected).toBeLessThan(0.02);
    });
    // the gradient alone: Δp/Δy = −ρ·g (Pascal's law) within 2 %
    const slope = (mean[0] - mean[2]) / (heights[2] - heights[0]);
    expect(Math.abs(slope - RHO_WATER * g) / (RHO_WATER * g)).toBeLessThan(0.02);
  });

  it('pressureField agrees with pressureAt and reading it leaves the bake unchanged', () => {
    const a = settledTank().sim, b = settledTank().sim;
    for (let f = 0; f < 6; f++) { a.stepFrame(); b.stepFrame(); }
    const field = a.pressureField();
    const { nx, cellSize: h } = a.grid;
    const i = 9, j = 12; // cell centre at ((i − ½)h, (j − ½)h)
    expect(a.pressureAt((i - 0.5) * h, (j - 0.5) * h)).toBeCloseTo(field[i + nx * j], 6);
    for (let f = 0; f < 3; f++) { a.stepFrame(); b.stepFrame(); }
    expect(Array.from(a.y)).toEqual(Array.from(b.y));
  });
});
