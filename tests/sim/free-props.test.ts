// Free props: rigid bodies under gravity, contacts with the tank, walls and the liquid (src/lib/sim/rigid.ts).
// Small grids so the file runs in seconds.
import { describe, it, expect } from 'vitest';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

const G = 9.81;

function scene(extra: Record<string, unknown>, tank: Record<string, unknown> = {}) {
  return sceneFrom({
    version: 2,
    tank: { width: 1, height: 1, cellSize: 1 / 32, sides: { top: true }, ...tank },
    timing: { fps: 24, startFrame: 1, endFrame: 1000, substeps: 2 },
    ...extra,
  });
}

const box = (y: number, more: Record<string, unknown> = {}) => ({
  id: 'box', shape: { type: 'rect', x: 0.4, y, width: 0.2, height: 0.1 }, motion: 'free', density: 600, ...more,
});

describe('free props', () => {
  it('fall freely before contact as Newton says: y = y0 + v0·t − g·t²/2, x = x0 + u0·t', () => {
    const sim = createSolver(scene({ props: [box(0.8, { velocity: [0.3, 1], spin: 0 })] }));
    const x0 = 0.5, y0 = 0.85;
    let dtMax = 0;
    for (let f = 1; f <= 9; f++) {
      const st = sim.stepFrame();
      dtMax = Math.max(dtMax, 1 / 24 / st.substeps);
      const t = f / 24, p = st.props[0];
      // Newton, Principia (1687): constant gravity, no drag. Allowed error: the first-order lag of
      // symplectic Euler, g·t·dt/2 (Hairer, Lubich & Wanner, Geometric Numerical Integration, 2006, §I.1),
      // the same bound as the ballistic particle test.
      expect(Math.abs(p.y - (y0 + 1 * t - (G * t * t) / 2))).toBeLessThan((G * t * dtMax) / 2 + 1e-6);
      expect(Math.abs(p.x - (x0 + 0.3 * t))).toBeLessThan(1e-9);
      expect(Math.abs(p.vy - (1 - G * t))).toBeLessThan(1e-9);
      expect(p.angle).toBe(0);
    }
  });

  it('a prop dropped onto a wall comes to rest on it without sinking in or jittering', () => {
    const wallTop = 0.3;
    const sim = createSolver(scene({
      walls: [{ id: 'shelf', shape: { type: 'rect', x: 0.2, y: 0.2, width: 0.6, height: 0.1 } }],
      props: [box(0.7)],
    }));
    const ys: number[] = [];
    for (let f = 1; f <= 48; f++) {
      const p = sim.stepFrame().props[0];
      const bottom = p.y - 0.05;
      // never more than 0.1 mm into the wall (contact resolution, common practice (no source))
      expect(bottom).toBeGreaterThan(wallTop - 1e-4);
      if (f > 36) { ys.push(p.y); expect(Math.hypot(p.vx, p.vy)).toBeLessThan(1e-3); expect(Math.abs(p.spin)).toBeLessThan(0.01); }
    }
    // resting on the wall (within 0.1 mm) and still: the last half second moves less than 0.01 mm
    expect(Math.abs(ys[ys.length - 1] - 0.05 - wallTop)).toBeLessThan(1e-4);
    expect(Math.max(...ys) - Math.min(...ys)).toBeLessThan(1e-5);
  });

  it('a free prop dropped on another comes to rest stacked on it, both on the floor', () => {
    const sim = createSolver(scene({
      props: [box(0.05, { id: 'lower' }), { ...box(0.4, { id: 'upper' }), shape: { type: 'rect', x: 0.45, y: 0.4, width: 0.1, height: 0.1 } }],
    }));
    let st = sim.stats();
    const tilt: number[] = [];
    for (let f = 1; f <= 72; f++) { st = sim.stepFrame(); if (f > 24) tilt.push(...st.props.map((p) => Math.abs(p.angle))); }
    const [lower, upper] = st.props;
    // lower: on the floor (centre 0.05 m up); upper: on the lower one's top (centre 0.15 m) — within 0.5 mm
    // (contact slop 0.2 mm), still and level (no rocking over the last two seconds)
    expect(Math.abs(lower.y - 0.05)).toBeLessThan(5e-4);
    expect(Math.abs(upper.y - 0.15)).toBeLessThan(5e-4);
    for (const p of st.props) expect(Math.hypot(p.vx, p.vy)).toBeLessThan(1e-3);
    expect(Math.max(...tilt)).toBeLessThan(0.01);
  });

  it('follows its keys until the release frame, then is free with the velocity the keys had', () => {
    const sim = createSolver(scene({
      props: [box(0.8, { releaseFrame: 7, keys: [{ frame: 1, dx: 0, dy: 0, angle: 0 }, { frame: 13, dx: 0.24, dy: 0, angle: 0 }] })],
    }));
    let p = sim.stats().props[0];
    for (let f = 1; f <= 6; f++) p = sim.stepFrame().props[0];
    // keyed: 0.24 m over 12 frames = 0.48 m/s across, no fall
    expect(p.x).toBeCloseTo(0.5 + 0.12, 9);
    expect(p.y).toBeCloseTo(0.85, 9);
    for (let f = 7; f <= 12; f++) p = sim.stepFrame().props[0];
    // free for 6 frames (0.25 s): keeps 0.48 m/s across, falls g·t²/2 ≈ 0.31 m (Newton; first-order lag as above)
    expect(p.vx).toBeCloseTo(0.48, 6);
    expect(p.x).toBeCloseTo(0.5 + 0.24, 6);
    expect(Math.abs(p.y - (0.85 - (G * 0.25 ** 2) / 2))).toBeLessThan((G * 0.25 * (1 / 48)) / 2 + 1e-6);
  });

  it('reports every prop, keyed ones too, in the frame stats', () => {
    const sim = createSolver(scene({
      props: [box(0.8), { id: 'paddle', shape: { type: 'rect', x: 0.1, y: 0.1, width: 0.1, height: 0.1 }, keys: [{ frame: 1, dx: 0, dy: 0, angle: 0 }, { frame: 25, dx: 0, dy: 0, angle: 90 }] }],
    }));
    const st = sim.stepFrame();
    expect(st.props.map((p) => p.id)).toEqual(['box', 'paddle']);
    expect(st.props[1].angle).toBeCloseTo(90 / 24, 9);
    expect(st.props[1].spin).toBeCloseTo(90, 6); // 90° over 24 frames at 24 fps
  });

  it('a prop of 2000 kg/m³ sinks to the floor of a pool and stays there', () => {
    const sim = createSolver(scene({
      pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1, height: 0.4 } }],
      props: [box(0.45, { density: 2000 })],
    }, { height: 0.75 }));
    let p = sim.stats().props[0];
    for (let f = 1; f <= 60; f++) {
      p = sim.stepFrame().props[0];
      // heavier than water (Archimedes): it only goes down, never into the floor
      expect(p.y - 0.05).toBeGreaterThan(-1e-4);
      if (f > 36) expect(p.y - 0.05).toBeLessThan(1 / 32); // on the floor (within a cell) from 1.5 s on
    }
  });

  it('a prop lighter than water floats: 600 kg/m³ stays at the surface, its draft between 0 and its height', () => {
    // Archimedes (On Floating Bodies, Book I, Prop. 5): draft = ρ/ρ_water × height = 0.06 m here; a coarse
    // 1/32 m grid, so only that it floats in the surface (the 5 % check is below, at 1/64 m)
    const sim = createSolver(scene({
      pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1, height: 0.4 } }],
      props: [box(0.34)],
    }, { height: 0.75 }));
    let p = sim.stats().props[0];
    for (let f = 1; f <= 72; f++) p = sim.stepFrame().props[0];
    const bottom = p.y - 0.05;
    expect(bottom).toBeGreaterThan(0.3); // not sunk
    expect(bottom).toBeLessThan(0.42); // in the water (surface about 0.40 m)
  });
});

describe('free props float (Archimedes)', () => {
  // Archimedes, On Floating Bodies, Book I, Prop. 5: a floating body displaces its own weight, so a box of
  // density ρ floats with draft ρ/ρ_water × height. Bound: 5 % of the height (the solver issue's acceptance;
  // measured −0.6 … +1.4 % at these cells over 4–10 s, src/lib/sim/rigid.ts).
  const h = 1 / 64, H = 0.2, depth = 0.4;
  function floating(rho: number) {
    return createSolver(sceneFrom({
      version: 2, tank: { width: 1, height: 0.75, cellSize: h, sides: { top: true } },
      timing: { fps: 24, startFrame: 1, endFrame: 1000, substeps: 2 },
      pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1, height: depth } }],
      props: [{ id: 'box', shape: { type: 'rect', x: 0.3, y: depth - (H * rho) / 1000, width: 0.4, height: H }, motion: 'free', density: rho }],
    }));
  }
  // free surface away from the prop: top particle of thin columns in x ∈ [0.02, 0.2] plus a quarter sub-cell
  function surface(sim: ReturnType<typeof createSolver>): number {
    let sum = 0;
    for (let c = 0; c < 9; c++) {
      const a = 0.02 + c * 0.02, b = a + 0.02;
      let top = -1;
      for (let k = 0; k < sim.count; k++) if (sim.x[k] >= a && sim.x[k] < b && sim.y[k] > top) top = sim.y[k];
      sum += top;
    }
    return sum / 9 + h / 4;
  }
  // speed of the prop's fastest point: |v| + |ω|·reach (reach: centroid to corner of the 0.4 × 0.2 box)
  const speed = (p: { vx: number; vy: number; spin: number }) => Math.hypot(p.vx, p.vy) + Math.abs((p.spin * Math.PI) / 180) * Math.hypot(0.2, 0.1);

  it.each([250, 500, 750])('ρ = %i kg/m³ released at rest on still water settles with draft ρ/1000 × height within 5 %% of the height', (rho) => {
    const sim = floating(rho);
    let p = sim.stats().props[0];
    let worst = 0;
    for (let f = 1; f <= 144; f++) {
      p = sim.stepFrame().props[0];
      if (f % 24 === 0 && f >= 72) worst = Math.max(worst, Math.abs(surface(sim) - (p.y - H / 2) - (H * rho) / 1000) / H);
    }
    // checked at 3, 4, 5 and 6 s: settled, and it stays settled
    expect(worst).toBeLessThan(0.05);
    expect(Math.abs(p.angle)).toBeLessThan(5); // floats level (a wide box is stable: metacentre above centroid)
  }, 60_000);

  it.each([250, 500])('ρ = %i kg/m³ comes to rest within 8 s: speed below 1 %% of √(g·height) over the following 2 s', (rho) => {
    // Bound: 1 % of √(g·H) (the acceptance; √(g·H) is the speed scale of a body of height H moving in
    // gravity, Froude scaling). The closed 1 m tank keeps sloshing for seconds (nothing radiates its waves
    // away), so "at rest" is measured after 8 s (measured: below it from 1.8 s at 250 kg/m³, 6 s at 500).
    const sim = floating(rho);
    const limit = 0.01 * Math.sqrt(G * H);
    let fastest = 0;
    for (let f = 1; f <= 240; f++) {
      const p = sim.stepFrame().props[0];
      if (f > 192) fastest = Math.max(fastest, speed(p));
    }
    expect(fastest).toBeLessThan(limit);
  }, 90_000);

  it('ρ = 750 kg/m³ comes to rest within 10 s: speed below 1 % of √(g·height) over the following 2 s', () => {
    // Same bound as above (the acceptance). The heavier float sits deeper and bobs at about the closed
    // tank's first sloshing period (1.1 s measured; linear theory for this 1 m tank, ω² = g·k·tanh(k·d),
    // k = π/L: 1.23 s — Lamb, Hydrodynamics, 1932, §227), so it trades energy with the sloshing for longer.
    // It used to stay above the bound past 10 s: the collision stage pushed the particles the bobbing prop
    // overtook without taking that push from the prop (stages.ts collide), so nothing the prop gave the liquid
    // slowed it. With Newton's third law there, measured 0.41 of the bound over 10–12 s (tidemark-flip/4; with
    // seeds 2 and 3 of the seeding jitter 0.82 and 0.85: it rests, but not by a wide margin).
    const sim = floating(750);
    const limit = 0.01 * Math.sqrt(G * H);
    let fastest = 0;
    for (let f = 1; f <= 288; f++) {
      const p = sim.stepFrame().props[0];
      if (f > 240) fastest = Math.max(fastest, speed(p));
    }
    expect(fastest).toBeLessThan(limit);
  }, 120_000);
});
