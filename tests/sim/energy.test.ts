// Energy of a closed tank with no drivers: a dam break sloshes from wall to wall. With gravity the only
// force, total energy E = Σ m(½|v|² + g·y) can only fall (viscous and numerical dissipation); a solver that
// gains energy is unstable in the long run (the explosions of tidemark-flip/1 were such a gain).
// Expected: no gain beyond 1 % (acceptance bound of the solver issue; conservation itself is Newtonian
// mechanics, no source needed) and a loss that we report.
//
// Measured from the seeded state (frame 0). What it loses: the dam break gives up about 60 % of its energy
// over 4 s (printed) to the PIC share of the transfer, inelastic collisions with the tank and the separation
// of particles. The start-up gain of earlier builds (+1.3 % in the first frame) came mostly from the position
// update lagging the velocities by half a step (+1.1 % with separation and drift correction off), and the
// rest from the drift flow kept as momentum; both are gone (src/lib/sim/stages.ts, gridToParticles).
import { describe, it, expect } from 'vitest';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

const G = 9.81;

function damBreakInClosedTank(flipRatio: number) {
  return createSolver(sceneFrom({
    version: 2,
    tank: { width: 1, height: 0.625, cellSize: 1 / 64, sides: { left: true, right: true, bottom: true, top: true } },
    timing: { fps: 24, startFrame: 1, endFrame: 200, substeps: 2 },
    physics: { flipRatio },
    pours: [{ id: 'block', shape: { type: 'rect', x: 0, y: 0, width: 0.35, height: 0.4 } }],
  }));
}

describe('energy in a closed tank', () => {
  for (const flipRatio of [0.9, 0.99]) {
    it(`never gains more than 1 % over its seeded state in 4 s of sloshing (flip ratio ${flipRatio})`, () => {
      const sim = damBreakInClosedTank(flipRatio);
      // per unit mass (every particle carries the same mass), J/kg
      const energy = () => {
        let e = 0;
        for (let p = 0; p < sim.count; p++) e += 0.5 * (sim.u[p] * sim.u[p] + sim.v[p] * sim.v[p]) + G * sim.y[p];
        return e / sim.count;
      };
      const seeded = energy();
      let max = seeded, last = seeded, first = seeded;
      for (let f = 1; f <= 96; f++) { sim.stepFrame(); last = energy(); if (f === 1) first = last; if (last > max) max = last; }
      const kick = (first - seeded) / seeded, gain = (max - seeded) / seeded, loss = (seeded - last) / seeded;
      console.log(`flip ${flipRatio}: first frame ${(100 * kick).toFixed(2)} %, largest gain over frame 0 ${(100 * gain).toFixed(2)} %, lost after 4 s ${(100 * loss).toFixed(1)} %`);
      expect(sim.count).toBeGreaterThan(0);
      expect(gain).toBeLessThanOrEqual(0.01);
      expect(loss).toBeGreaterThan(0); // sloshing dies down: energy is lost, not made
    }, 60_000);
  }
});
