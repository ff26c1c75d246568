// Foam and spray: diffuse particles after Ihmsen, Akinci, Gissler & Teschner 2012, "Unified spray, foam and
// bubbles for particle-based fluids" (The Visual Computer 28). Each liquid particle gets three potentials —
// trapped air (relative velocity of neighbours moving towards it), wave crest (surface curvature where the
// liquid moves outwards) and kinetic energy — each clamped to [0, 1] by Φ(I, τmin, τmax); the particle then
// emits n = Φk·(k_ta·Φta + k_wc·Φwc)·Δt diffuse particles near itself. A diffuse particle with few liquid
// neighbours is spray (ballistic, gravity only); with about a surface's worth it is foam (carried with its
// neighbours' mean velocity) and ages until its lifetime is spent; deep inside the liquid it is a bubble (buoyant,
// dragged towards the liquid's velocity: v += Δt·(−k_b·g) + k_d·(ṽ − v)), which rises to the surface to become foam.
//
// A read-only stage: it reads the liquid's positions and velocities and the spatial hash right after the
// solver's 'spatial hash' stage sorted them, and writes only its own arrays, so the liquid bakes exactly as
// without it. Deterministic: its own mulberry32 stream (seeded from physics.seed), particles in array order,
// no trigonometry (a disc is sampled by rejection), so the same scene gives bit-identical foam every run.
//
// Constants: the potential ranges and rates below are our own choice for a 2-D grid of 4 particles per cell
// (the paper's values are for 3-D SPH neighbourhoods and are not reused); tuned on the harbour splash fixture.
import type { Scene } from '../scene/schema';
import type { FlipState } from './stages';
import { mulberry32 } from './prng';

export const SPRAY = 0;
export const FOAM = 1;
export const BUBBLE = 2;

/** Diffuse particles now: positions (m), velocities (m/s), kind (SPRAY, FOAM or BUBBLE), views valid until the next step. */
export interface DiffuseView {
  readonly count: number;
  readonly x: Float32Array;
  readonly y: Float32Array;
  readonly u: Float32Array;
  readonly v: Float32Array;
  readonly kind: Uint8Array;
}

/** Scene setting look.foam: 0 = off, 1 = default, up to 2 = twice as many diffuse particles. */
export function foamScale(scene: Scene): number {
  return scene.look?.foam ?? 1;
}

/** Most diffuse particles alive at once (older foam is not kept beyond it: new ones are not emitted). */
export const DIFFUSE_CAPACITY = 40000;

// Clamp ranges [τmin, τmax] of the potentials (see the header: our own values for this grid).
const TA = [1.5, 8] as const; // trapped air, m/s (kernel-weighted relative speed)
const WC = [0.4, 2.5] as const; // wave crest, kernel-weighted (1 − n̂i·n̂j)
const KE = [0.6, 6] as const; // kinetic energy per unit mass, J/kg (speeds ≈ 1.1 to 3.5 m/s)
// Emission rates per liquid particle per second at full potential.
const K_TA = 200;
const K_WC = 300;
/** Foam lifetime, s: uniform in [LIFE_MIN, LIFE_MIN + LIFE_SPAN]. */
const LIFE_MIN = 0.6;
const LIFE_SPAN = 1.2;
/** Neighbour fraction of a full bulk neighbourhood below which a diffuse particle is spray. */
const SPRAY_FRACTION = 0.15;
/** Neighbour fraction above which it is a bubble (a particle at a flat surface has about half a neighbourhood). */
const BUBBLE_FRACTION = 0.9;
/** Bubble buoyancy k_b (multiples of −g) and drag k_d per step (the paper's form; our values). */
const K_BUOYANCY = 1.5;
const K_DRAG = 0.5;
/** Surface indicator: |Σ x̂ij·W| / Σ W above this marks a surface particle (its normal is used for crests). */
const SURFACE_INDICATOR = 0.25;
/** Alignment v̂·n̂ a crest needs (the paper's δ_vn cut-off of 0.6). */
const CREST_ALIGN = 0.6;

export interface DiffuseStage {
  readonly view: DiffuseView;
  /** One substep (after the solver's spatial hash): advect, reclassify, age; emit when the substep ends a frame. */
  run(dt: number, f0: number, f1: number): void;
}

export function createDiffuse(S: FlipState, scene: Scene): DiffuseStage {
  const scale = foamScale(scene);
  const rand = mulberry32((scene.physics.seed ^ 0x6f616d31) >>> 0);
  const cap = DIFFUSE_CAPACITY;
  const x = new Float32Array(cap), y = new Float32Array(cap), u = new Float32Array(cap), v = new Float32Array(cap);
  const life = new Float32Array(cap);
  const kind = new Uint8Array(cap);
  let n = 0;
  // per liquid particle scratch: unit normal (0 when not at the surface)
  const nx = new Float32Array(S.cap), ny = new Float32Array(S.cap);
  // per hash cell: 1 where a particle that can emit (kinetic potential > 0) lies within two cells (see emit)
  const hot = new Uint8Array(S.hnx * S.hny), hotRow = new Uint8Array(S.hnx * S.hny);
  // neighbourhood: two hash cells (the hash cell is ≥ 2r), searched over a 5 × 5 block of hash cells
  const R = 2 * S.hs, R2 = R * R, invR = 1 / R;
  // neighbours of a particle in settled liquid: the kernel-weighted count Σ(1 − r/R) over a disc of radius R
  // holds ρ·πR²/3 (∫ (1 − r/R) 2πr dr) particles' worth at ρ = ppc/h² particles per m²
  const bulkWeight = (S.ppc / (S.h * S.h)) * (Math.PI * R2) / 3;
  const sprayBelow = SPRAY_FRACTION * bulkWeight;
  const bubbleAbove = BUBBLE_FRACTION * bulkWeight;
  const frameDt = 1 / scene.timing.fps;
  const tiny = 1e-12;

  // result of gather(): weighted neighbour count and mean velocity
  let gW = 0, gU = 0, gV = 0;
  /** Kernel-weighted liquid neighbours of (px, py) and their weighted mean velocity. */
  function gather(px: number, py: number): void {
    const { hstart, hnx, hny, invHs, h } = S;
    const X = S.x, Y = S.y, U = S.u, V = S.v;
    const ci = Math.floor((px + h) * invHs), cj = Math.floor((py + h) * invHs);
    let w = 0, su = 0, sv = 0;
    for (let j = Math.max(0, cj - 2); j <= Math.min(hny - 1, cj + 2); j++) {
      { // the row's cells ci − 2 … ci + 2 hold one contiguous range of the sorted particles
        const row = hnx * j, i0 = Math.max(0, ci - 2), i1 = Math.min(hnx - 1, ci + 2);
        for (let q = hstart[row + i0], e = hstart[row + i1 + 1]; q < e; q++) {
          const ex = px - X[q], ey = py - Y[q], r2 = ex * ex + ey * ey;
          if (r2 >= R2) continue;
          const k = 1 - Math.sqrt(r2) * invR;
          w += k; su += k * U[q]; sv += k * V[q];
        }
      }
    }
    gW = w;
    gU = w > tiny ? su / w : 0;
    gV = w > tiny ? sv / w : 0;
  }

  function advect(dt: number): void {
    const { gx, gy, width, height, solid } = S;
    let k = 0;
    for (let d = 0; d < n; d++) {
      gather(x[d], y[d]);
      let du = u[d], dv = v[d], l = life[d];
      if (gW < sprayBelow) {
        kind[k] = SPRAY; du += gx * dt; dv += gy * dt; // spray: ballistic, does not age
      } else if (gW > bubbleAbove) {
        kind[k] = BUBBLE; // bubble: rises against gravity, dragged towards the liquid's velocity, does not age
        du += -K_BUOYANCY * gx * dt + K_DRAG * (gU - du);
        dv += -K_BUOYANCY * gy * dt + K_DRAG * (gV - dv);
      } else {
        kind[k] = FOAM; du = gU; dv = gV; l -= dt; // foam: carried by the liquid, ages
      }
      const px = x[d] + du * dt, py = y[d] + dv * dt;
      if (l <= 0 || !(px >= 0 && px <= width && py >= 0 && py <= height) || solid[S.cellOf(px, py)]) continue;
      x[k] = px; y[k] = py; u[k] = du; v[k] = dv; life[k] = l; k++;
    }
    n = k;
  }

  /** Φ(I, τmin, τmax) of the paper: (min(I, τmax) − min(I, τmin)) / (τmax − τmin). */
  const clampPotential = (I: number, t: readonly [number, number]) => (Math.min(I, t[1]) - Math.min(I, t[0])) / (t[1] - t[0]);

  function emit(dtGen: number): void {
    const { hstart, hnx, hny, invHs, h } = S;
    const X = S.x, Y = S.y, U = S.u, V = S.v, count = S.n;
    // Normals are read only for particles that can emit (kinetic potential > 0) and for their neighbours, all
    // within two hash cells of them: mark those cells (the emitters' cells dilated by two), and leave the
    // normals of particles elsewhere (a pool at rest) uncomputed; they are never read.
    hot.fill(0);
    for (let p = 0; p < count; p++) {
      const pu = U[p], pv = V[p];
      if (!(clampPotential(0.5 * (pu * pu + pv * pv), KE) > 0)) continue;
      const ci = Math.min(hnx - 1, Math.max(0, Math.floor((X[p] + h) * invHs))), cj = Math.min(hny - 1, Math.max(0, Math.floor((Y[p] + h) * invHs)));
      hot[ci + hnx * cj] = 1;
    }
    for (let j = 0; j < hny; j++) for (let i = 0, c = hnx * j; i < hnx; i++, c++) {
      let m = 0;
      for (let k = Math.max(0, i - 2); k <= Math.min(hnx - 1, i + 2); k++) m |= hot[hnx * j + k];
      hotRow[c] = m;
    }
    for (let j = 0; j < hny; j++) for (let i = 0, c = hnx * j; i < hnx; i++, c++) {
      let m = 0;
      for (let k = Math.max(0, j - 2); k <= Math.min(hny - 1, j + 2); k++) m |= hotRow[i + hnx * k];
      hot[c] = m;
    }
    // normals from the colour-field gradient: Σ x̂ij·W points out of the liquid; only surface particles keep one
    for (let p = 0; p < count; p++) {
      const px = X[p], py = Y[p];
      const ci = Math.floor((px + h) * invHs), cj = Math.floor((py + h) * invHs);
      if (hot[Math.min(hnx - 1, Math.max(0, ci)) + hnx * Math.min(hny - 1, Math.max(0, cj))] === 0) { nx[p] = 0; ny[p] = 0; continue; }
      let w = 0, gxs = 0, gys = 0;
      for (let j = Math.max(0, cj - 2); j <= Math.min(hny - 1, cj + 2); j++) {
        { // the row's cells ci − 2 … ci + 2 hold one contiguous range of the sorted particles
          const row = hnx * j, i0 = Math.max(0, ci - 2), i1 = Math.min(hnx - 1, ci + 2);
          for (let q = hstart[row + i0], e = hstart[row + i1 + 1]; q < e; q++) {
            if (q === p) continue;
            const ex = px - X[q], ey = py - Y[q], r2 = ex * ex + ey * ey;
            if (r2 >= R2 || r2 < tiny) continue;
            const r = Math.sqrt(r2), k = 1 - r * invR;
            w += k; gxs += (k * ex) / r; gys += (k * ey) / r;
          }
        }
      }
      const m = Math.sqrt(gxs * gxs + gys * gys);
      if (w > tiny && m / w > SURFACE_INDICATOR) { nx[p] = gxs / m; ny[p] = gys / m; } else { nx[p] = 0; ny[p] = 0; }
    }
    for (let p = 0; p < count && n < cap; p++) {
      const pu = U[p], pv = V[p], s2 = pu * pu + pv * pv;
      const fk = clampPotential(0.5 * s2, KE);
      if (fk <= 0) continue;
      const px = X[p], py = Y[p];
      const ci = Math.floor((px + h) * invHs), cj = Math.floor((py + h) * invHs);
      let ta = 0, wc = 0;
      const surface = nx[p] !== 0 || ny[p] !== 0;
      for (let j = Math.max(0, cj - 2); j <= Math.min(hny - 1, cj + 2); j++) {
        { // the row's cells ci − 2 … ci + 2 hold one contiguous range of the sorted particles
          const row = hnx * j, i0 = Math.max(0, ci - 2), i1 = Math.min(hnx - 1, ci + 2);
          for (let q = hstart[row + i0], e = hstart[row + i1 + 1]; q < e; q++) {
            if (q === p) continue;
            const ex = px - X[q], ey = py - Y[q], r2 = ex * ex + ey * ey;
            if (r2 >= R2 || r2 < tiny) continue;
            const r = Math.sqrt(r2), k = 1 - r * invR;
            // trapped air: |v_ij|·(1 − v̂_ij·x̂_ij)·W, v_ij = v_i − v_j, x_ij = x_i − x_j
            const ru = pu - U[q], rv = pv - V[q], rs = Math.sqrt(ru * ru + rv * rv);
            if (rs > tiny) ta += rs * (1 - (ru * ex + rv * ey) / (rs * r)) * k;
            // wave crest: (1 − n̂_i·n̂_j)·W over neighbours behind the surface (x̂_ji·n̂_i < 0)
            if (surface && (nx[q] !== 0 || ny[q] !== 0) && -(ex * nx[p] + ey * ny[p]) < 0) wc += (1 - (nx[p] * nx[q] + ny[p] * ny[q])) * k;
          }
        }
      }
      // crests count only where the liquid moves along its outward normal (v̂·n̂ ≥ 0.6)
      const s = Math.sqrt(s2);
      if (!(surface && (pu * nx[p] + pv * ny[p]) >= CREST_ALIGN * s)) wc = 0;
      const expected = scale * fk * (K_TA * clampPotential(ta, TA) + K_WC * clampPotential(wc, WC)) * dtGen;
      if (expected <= 0) continue;
      const spawn = Math.floor(expected + rand());
      for (let k = 0; k < spawn && n < cap; k++) {
        // a point of the disc of radius h/2 around the particle, by rejection (no trigonometry)
        let ox = 0, oy = 0;
        do { ox = 2 * rand() - 1; oy = 2 * rand() - 1; } while (ox * ox + oy * oy > 1);
        x[n] = px + 0.5 * h * ox; y[n] = py + 0.5 * h * oy; u[n] = pu; v[n] = pv;
        life[n] = LIFE_MIN + LIFE_SPAN * rand();
        kind[n] = SPRAY;
        n++;
      }
    }
  }

  const view: DiffuseView = {
    get count() { return n; },
    get x() { return x.subarray(0, n); },
    get y() { return y.subarray(0, n); },
    get u() { return u.subarray(0, n); },
    get v() { return v.subarray(0, n); },
    get kind() { return kind.subarray(0, n); },
  };

  return {
    view,
    run(dt, f0, f1) {
      advect(dt);
      // emit once per frame, on the substep that reaches the frame's end (rates are per second of shot time)
      if (Math.floor(f1 + 1e-6) > Math.floor(f0 + 1e-6)) emit(frameDt);
    },
  };
}

/** The view of a scene with foam off. */
export const NO_DIFFUSE: DiffuseView = {
  count: 0, x: new Float32Array(0), y: new Float32Array(0), u: new Float32Array(0), v: new Float32Array(0), kind: new Uint8Array(0),
};
