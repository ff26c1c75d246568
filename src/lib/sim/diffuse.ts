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
// Constants: the potential ranges are set from the scene's kernel radius and gravity (see "Clamp ranges" below; the
// paper's values are for 3-D SPH neighbourhoods and are not reused); the emission rates are our own.
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

/** Most diffuse particles alive at once in any scene (beyond the cap no new ones are emitted). */
export const DIFFUSE_CAPACITY = 40000;
/**
 * Most diffuse particles alive per liquid particle the bake can hold: a violent scene (a dam break sloshing at
 * several U for seconds) saturates the potentials of most of its particles, and its foam is then bounded by
 * this share rather than by the thresholds, so the clip's foam section stays within half the liquid's count.
 */
export const DIFFUSE_PER_LIQUID = 0.5;

// Clamp ranges [τmin, τmax] of the potentials. The paper notes they depend on the scene's scale (its values are for
// 3-D SPH scenes and are not reused). Ours are set in the units of the stage's own kernel radius R and gravity g, so
// a can splashing into a pool on 12.5 mm cells and a dam break on 8 mm cells are judged by the same rule:
//
//  - Speeds as Froude numbers at the kernel. In a free-surface flow driven by gravity, motion of length L has
//    speeds of order √(g·L) (Froude similarity); the smallest motion this stage resolves spans R, so speeds are
//    measured in U = √(g·R) (0.40 m/s for the hero demo's R = 16.5 mm).
//  - Kinetic energy per unit mass ½|v|² against the work g·z to rise a height z: Φk starts where a particle could
//    leave its neighbourhood ballistically, rising one kernel radius (½|v|² = g·R: 0.57 m/s there), and is full where
//    it could be thrown KE_RISE_FULL radii high (1.14 m/s there). Liquid sloshing at a few cm/s stays at 0.
//  - Trapped air: Σ|v_ij|(1 − v̂_ij·x̂_ij)W sums over the neighbourhood. Splashes trap air at the surface, where a
//    particle has about half a bulk neighbourhood (W_bulk/2); a front of liquid meeting it head-on at relative speed
//    V over half of that (factor 1 − cos = 2) gives V·W_bulk/2. Its range is a range of impact speeds V times
//    W_bulk/2: from U (Froude number 1 at the kernel) to TA_FR_FULL·U.
//  - Wave crest: on a crest of radius of curvature ρ, a neighbour at distance r along the surface has a normal
//    turned by r/ρ, so 1 − n̂_i·n̂_j ≈ r²/(2ρ²); summed over the surface row of particles (spacing d = h/√ppc) with
//    W = 1 − r/R it is ≈ (2/d)∫₀ᴿ (1 − r/R) r²/(2ρ²) dr = R³/(12·d·ρ²). A crest as sharp as the kernel (ρ = R) is
//    full; one flatter than WC_RHO_ZERO kernel radii gives 0.
/** Kinetic potential full at a ballistic rise of this many kernel radii. */
const KE_RISE_FULL = 4;
/** Trapped-air potential full at this impact speed, in U = √(g·R) (it starts at 1 U). */
const TA_FR_FULL = 4;
/** Wave-crest potential 0 at this radius of curvature, in kernel radii (it is full at 1). */
const WC_RHO_ZERO = 2;
// Emission rates per liquid particle per second at full potential (the paper's k_ta, k_wc; our values: at 25 fps a
// particle at full potential seeds 20 a frame, so a splash of ~100 fast particles throws a few hundred).
const K_TA = 500;
const K_WC = 500;
// Viscous liquids do not break up into spray and foam the way water does. Whether viscosity or surface tension
// holds a liquid together at length L is the Ohnesorge number Oh = μ/√(ρ·σ·L) = ν·√(ρ/(σ·L)); drop break-up needs
// markedly more inertia once Oh passes about 0.1 and is suppressed beyond about 1 (the break-up regime maps of
// Hsiang & Faeth 1992, "Near-limit drop deformation and secondary breakup", from memory). Per liquid, at the
// kernel radius R, with water's surface tension against air (0.072 N/m, from memory; the solver models none) and
// water's density: emission is scaled by clamp(−log₁₀ Oh, 0, 1) — 1 up to Oh = 0.1, 0 from Oh = 1. Water
// (ν = 1e-6 m²/s, Oh ≈ 1e-3 at R = 16.5 mm) keeps all of it; thick paint (ν = 1e-2, Oh ≈ 9) throws none.
const SURFACE_TENSION = 0.072;
const LIQUID_DENSITY = 1000;
/** Emission factor of a liquid of kinematic viscosity ν (m²/s) at kernel radius R (m): see above. */
export function breakupFactor(viscosity: number, R: number): number {
  const oh = viscosity * Math.sqrt(LIQUID_DENSITY / (SURFACE_TENSION * R));
  if (!(oh > 0)) return 1;
  return Math.min(1, Math.max(0, -Math.log10(oh)));
}
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
  const cap = Math.min(DIFFUSE_CAPACITY, Math.ceil(DIFFUSE_PER_LIQUID * S.cap));
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
  // the potentials' clamp ranges for this scene's kernel and gravity (see the constants above); a scene without
  // gravity takes standard gravity for its speed unit
  const gRef = Math.hypot(S.gx, S.gy) || 9.80665;
  const speedUnit = Math.sqrt(gRef * R);
  const KE: readonly [number, number] = [gRef * R, KE_RISE_FULL * gRef * R];
  const TA: readonly [number, number] = [0.5 * bulkWeight * speedUnit, 0.5 * bulkWeight * TA_FR_FULL * speedUnit];
  const crestFull = R / (12 * (S.h / Math.sqrt(S.ppc))); // R³/(12·d·ρ²) at ρ = R
  const WC: readonly [number, number] = [crestFull / (WC_RHO_ZERO * WC_RHO_ZERO), crestFull];
  // per liquid (index into scene.liquids): how much of the paper's emission a liquid this viscous gives
  const breakup = Float64Array.from(scene.liquids, (l) => breakupFactor(l.viscosity ?? 0, R));
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
    // the liquid's velocities carry this substep's gravity kick g·dt, not yet projected out (see emit): foam and
    // bubbles follow the liquid's velocity without it
    for (let d = 0; d < n; d++) {
      gather(x[d], y[d]);
      let du = u[d], dv = v[d], l = life[d];
      if (gW < sprayBelow) {
        kind[k] = SPRAY; du += gx * dt; dv += gy * dt; // spray: ballistic, does not age
      } else if (gW > bubbleAbove) {
        kind[k] = BUBBLE; // bubble: rises against gravity, dragged towards the liquid's velocity, does not age
        du += -K_BUOYANCY * gx * dt + K_DRAG * (gU - gx * dt - du);
        dv += -K_BUOYANCY * gy * dt + K_DRAG * (gV - gy * dt - dv);
      } else {
        kind[k] = FOAM; du = gU - gx * dt; dv = gV - gy * dt; l -= dt; // foam: carried by the liquid, ages
      }
      const px = x[d] + du * dt, py = y[d] + dv * dt;
      if (l <= 0 || !(px >= 0 && px <= width && py >= 0 && py <= height) || solid[S.cellOf(px, py)]) continue;
      x[k] = px; y[k] = py; u[k] = du; v[k] = dv; life[k] = l; k++;
    }
    n = k;
  }

  /** Φ(I, τmin, τmax) of the paper: (min(I, τmax) − min(I, τmin)) / (τmax − τmin). */
  const clampPotential = (I: number, t: readonly [number, number]) => (Math.min(I, t[1]) - Math.min(I, t[0])) / (t[1] - t[0]);

  /**
   * Emits the frame's new diffuse particles (dtGen: the time they stand for, s). The liquid's velocities here are the
   * last projected ones plus this substep's gravity kick g·dt (the stage runs between 'gravity and advection' and the
   * projection, which takes the kick back out of liquid at rest), so the potentials read v − g·dt: the liquid's own
   * motion. Relative velocities are unchanged by it.
   */
  function emit(dtGen: number, dt: number): void {
    const kx = S.gx * dt, ky = S.gy * dt;
    const { hstart, hnx, hny, invHs, h } = S;
    const X = S.x, Y = S.y, U = S.u, V = S.v, count = S.n;
    const liquidOf = S.liquid; // read each time: the sort swaps its buffers
    // Normals are read only for particles that can emit (kinetic potential > 0) and for their neighbours, all
    // within two hash cells of them: mark those cells (the emitters' cells dilated by two), and leave the
    // normals of particles elsewhere (a pool at rest) uncomputed; they are never read.
    hot.fill(0);
    for (let p = 0; p < count; p++) {
      if (breakup[liquidOf[p]] <= 0) continue;
      const pu = U[p] - kx, pv = V[p] - ky;
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
      const bf = breakup[liquidOf[p]];
      if (bf <= 0) continue;
      const pu = U[p] - kx, pv = V[p] - ky, s2 = pu * pu + pv * pv;
      const fk = clampPotential(0.5 * s2, KE) * bf;
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
            const ru = pu + kx - U[q], rv = pv + ky - V[q], rs = Math.sqrt(ru * ru + rv * rv);
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
      if (Math.floor(f1 + 1e-6) > Math.floor(f0 + 1e-6)) emit(frameDt, dt);
    },
  };
}

/** The view of a scene with foam off. */
export const NO_DIFFUSE: DiffuseView = {
  count: 0, x: new Float32Array(0), y: new Float32Array(0), u: new Float32Array(0), v: new Float32Array(0), kind: new Uint8Array(0),
};
