// Vertical momentum of a closed tank with a free prop dropped into it (src/lib/sim/rigid.ts couples the prop
// into the pressure solve). Newton's second and third laws: the liquid and the prop push each other with equal
// and opposite impulses, so the total vertical momentum P of liquid + prop changes only by gravity and the
// tank's reaction: P(t) − P(0) = −M·g·t + J_floor(t), the side walls pushing only sideways (no viscosity).
// J_floor is the impulse the floor gives the liquid: the pressure at the floor × cell width, summed over the
// substeps, with the floor's pressure extrapolated linearly from the two lowest liquid cells' centres,
// p_floor = 1.5·p₁ − 0.5·p₂ (second order; the bottom cell's centre alone reads ρ·g·h/2 low, 3.9 % of the
// hydrostatic floor pressure at this 0.4 m depth and 1/32 m cells).
// The liquid's mass is the solver's own: each particle stands for h²/ρ₀ of liquid (ρ₀ in particles per cell).
// The prop's share: the tank with the prop minus the same tank without it. It used to be ≈ 7–10 N·s/m, about
// half the 18 N·s/m the prop brings down, appearing at impact: the collision stage (stages.ts collide) gave
// the particles a prop overtook the prop's normal velocity and took nothing from the prop. The prop now takes
// the opposite impulse (Newton's third law), and the share is ≤ 1.6 N·s/m (measured, tidemark-flip/4).
import { describe, it, expect } from 'vitest';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

const G = 9.81, h = 1 / 32, DT = 1 / 240;

function tank(withProp: boolean) {
  return createSolver(sceneFrom({
    version: 2, tank: { width: 1, height: 1, cellSize: h, sides: { left: true, right: true, bottom: true, top: true } },
    timing: { fps: 24, startFrame: 1, endFrame: 1000, substeps: 2 },
    physics: { seed: 2 },
    pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1, height: 0.4 } }],
    props: withProp ? [{ id: 'box', shape: { type: 'rect', x: 0.4, y: 0.6, width: 0.2, height: 0.1 }, motion: 'free', density: 500 }] : [],
  }));
}

/** Runs 1 s in steps of 1/240 s; returns the momentum balance residual P − P0 + M·g·t − J_floor (N·s/m) each 0.1 s. */
function balance(withProp: boolean) {
  const sim = tank(withProp);
  const mProp = withProp ? 500 * 0.2 * 0.1 : 0;
  const P = (mp: number) => {
    let s = 0;
    for (let i = 0; i < sim.count; i++) s += sim.v[i];
    return s * mp + (withProp ? mProp * sim.stats().props[0].vy : 0);
  };
  const { nx } = sim.grid;
  let mp = 0, P0 = 0, M = 0, J = 0, t = 0, impact = 0;
  const residual: number[] = [];
  for (let k = 1; k <= 240; k++) {
    if (k === 1) {
      // ρ₀ is fixed in the first step; the state before it is at rest (P0 = 0 either way)
      sim.step(DT); t += DT;
      mp = (1000 * h * h) / sim.restDensity;
      M = mp * sim.count + mProp;
      P0 = -M * G * DT; // what gravity alone gives the first step (the floor's first impulse is added below)
    } else { sim.step(DT); t += DT; }
    const pf = sim.pressureField();
    let f = 0;
    for (let i = 1; i < nx - 1; i++) f += (1.5 * pf[i + nx] - 0.5 * pf[i + 2 * nx]) * h;
    J += f * DT;
    if (withProp) impact = Math.max(impact, -mProp * sim.stats().props[0].vy);
    if (k % 24 === 0) residual.push(P(mp) - P0 + M * G * (t - DT) - J);
  }
  return { residual, gravity: M * G * t, impact };
}

describe('momentum of liquid + free prop in a closed tank', () => {
  it('changes only by gravity and the floor\'s reaction (bounds stated below)', () => {
    const withProp = balance(true), without = balance(false);
    expect(withProp.impact).toBeGreaterThan(10); // it did fall in (m·√(2·g·0.2 m) ≈ 20 N·s/m, Newton)
    const worst = Math.max(...withProp.residual.map(Math.abs));
    const coupling = Math.max(...withProp.residual.map((r, k) => Math.abs(r - without.residual[k])));
    console.log(`momentum: residual ≤ ${worst.toFixed(2)} N·s/m (${(100 * worst / withProp.gravity).toFixed(2)} % of M·g·t = ${withProp.gravity.toFixed(0)}); with − without prop ≤ ${coupling.toFixed(2)} N·s/m; prop's largest downward momentum ${withProp.impact.toFixed(2)} N·s/m`);
    // Bound 1 (ours, no source): within 3 % of gravity's impulse over 1 s. What it allows: the PIC/FLIP
    // transfers and the tank's collision clamp are not exactly momentum-conserving, and the extrapolated floor
    // pressure is exact only for a linear pressure profile (measured 2.3 % with or without a prop: a property
    // of the liquid solver, not of the coupling).
    expect(worst).toBeLessThan(0.03 * withProp.gravity);
    // Bound 2 (ours, no source): the prop changes the balance by less than a quarter of the momentum it brings
    // down. A coupling that lost the prop's push on the liquid (or the liquid's on the prop) would be off by
    // about all of it, the one-sided collision push by half (see the file's head); measured 0.09.
    expect(coupling).toBeLessThan(0.25 * withProp.impact);
  }, 60_000);
});
