// Period of the first sloshing mode of a closed tank against linear wave theory: a standing wave of
// wavenumber k = π/L in liquid of depth d has ω² = g·k·tanh(k·d) (the linear dispersion relation: Lamb,
// Hydrodynamics, 6th ed., 1932, §227–228 (section numbers from memory); Dean & Dalrymple, Water Wave Mechanics
// for Engineers and Scientists, 1991, ch. 3). The liquid starts at rest with its surface d + a·cos(πx/L),
// a = 2 cm (a/d ≈ 0.07, a/L = 0.02: small, so linear theory holds to well under 1 %); the centre of mass moves
// sideways with the mode, and its zero crossings give the period.
import { describe, it, expect } from 'vitest';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom, mean } from './helpers/scenes';

describe('sloshing period', () => {
  it('first mode of a 1 m tank, 0.3 m deep, 1/64 m cells: within 1 % of linear theory (Lamb 1932)', () => {
    const h = 1 / 64, L = 1, d = 0.3, a = 0.02, g = 9.81;
    const points: [number, number][] = [[0, 0], [L, 0]];
    for (let i = 40; i >= 0; i--) { const x = (i / 40) * L; points.push([x, d + a * Math.cos((Math.PI * x) / L)]); }
    const sim = createSolver(sceneFrom({
      version: 2, tank: { width: L, height: 0.625, cellSize: h, sides: { left: true, right: true, bottom: true, top: true } },
      timing: { fps: 60, startFrame: 1, endFrame: 1000, substeps: 2 }, physics: { seed: 3 },
      pours: [{ id: 'slosh', shape: { type: 'polygon', points } }],
    }));
    const k = Math.PI / L, T = (2 * Math.PI) / Math.sqrt(g * k * Math.tanh(k * d)); // 1.319 s
    const crossings: number[] = [];
    let prev = mean(sim.x) - L / 2, tPrev = 0;
    for (let f = 1; f <= Math.ceil(3.2 * T * 60); f++) {
      const st = sim.stepFrame();
      const c = mean(sim.x) - L / 2;
      if (prev * c < 0) crossings.push(tPrev + ((st.time - tPrev) * prev) / (prev - c));
      prev = c; tPrev = st.time;
    }
    expect(crossings.length).toBeGreaterThanOrEqual(6); // three periods
    const measured = (crossings[crossings.length - 1] - crossings[0]) / ((crossings.length - 1) / 2);
    console.log(`sloshing: theory ${T.toFixed(4)} s, measured ${measured.toFixed(4)} s (${((100 * (measured - T)) / T).toFixed(2)} %)`);
    expect(Math.abs(measured - T) / T).toBeLessThan(0.01);
  }, 120_000);
});
