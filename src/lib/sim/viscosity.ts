// Implicit viscosity per liquid on the MAC grid: the variational method of Batty & Bridson 2008,
// "Accurate viscous free surfaces for buckling, coiling, and rotating liquids" (Proc. ACM SIGGRAPH/
// Eurographics Symposium on Computer Animation), backward Euler as in Carlson, Mucha, Van Horn & Turk 2002,
// "Melting and flowing" (same symposium), solved by conjugate gradient.
//
// One viscous step finds the velocity u that minimises (per unit density ρ, which all liquids share)
//   E(u) = ½ Σ_faces V_f (u_f − u*_f)²  +  dt Σ_cells ν_c V_c (D_xx² + D_yy²)  +  dt Σ_nodes ν_n V_n · 2 D_xy²,
// with u* the velocity after particles-to-grid, D = ½(∇u + ∇uᵀ) the strain rate: D_xx, D_yy at cell centres,
// D_xy at cell corners (nodes), and V the liquid fraction of each control volume. Setting ∂E/∂u = 0 gives
//   (V + dt·K) u = V u*,   K = Gᵀ (2ν V) G  (symmetric positive definite on the unknown faces),
// the backward-Euler step of ρ ∂u/∂t = ∇·(2μD): stable at any dt and never adds kinetic energy. Because only
// the liquid's volume enters E, the free surface is traction-free without any explicit boundary rule, and
// faces on solids, held at the solid's velocity, make walls and props no-slip — the two reasons Batty &
// Bridson give for this form over the per-component Laplacian ν∇²u (which with a zero-gradient surface
// rule damps surface waves at half the rate Lamb's theory gives).
//
// Liquid fractions: V_c = min(1, ρ_c/ρ₀) from the particle density (the tent-kernel deposit reads ½ for a
// flat surface through the cell centre); V_face = mean of its two cells; V_node = mean of its four cells.
// Solids and the grid's border ring count as 0. Viscosity: ν_c is the deposit-weighted mean of the
// particles' liquids (Σ w_pc ν_p / Σ w_pc, the same tent weights as the density), ν_n the V-weighted mean of
// its four cells. A node is dropped when one of its four faces has no liquid on either side (it has nothing
// to couple to). Faces touching a solid are known (their solid velocity); every other face with V_f > 0 is
// an unknown.
import type { Scene } from '../scene/schema';
import { CENTRES, type Bilinear } from './kernel';

/** The solver state the viscous step reads and writes (FlipState implements it). */
export interface ViscosityGrid {
  nx: number; ny: number; nc: number;
  h: number; invH: number;
  /** Grid velocities: gu[c] on the left face of cell c, gv[c] on its bottom face (m/s). */
  gu: Float64Array; gv: Float64Array;
  /** 1 where the cell is solid. */
  solid: Uint8Array;
  /** Particle density at cell centres (particles per cell) and the rest density ρ₀. */
  dens: Float64Array;
  restDensity: number;
  n: number;
  x: Float32Array; y: Float32Array;
  /** Liquid index of each particle (into scene.liquids). */
  liquid: Uint8Array;
  /** The transfers' bilinear kernel (kernel.ts). */
  kernel: Bilinear;
}

/**
 * ν·dt/h² below which the viscous step is left out of a bake: the largest per-step damping it could apply,
 * even to the grid's shortest wave, is then below about 1 % (8·ν·dt/h² for the checkerboard mode), far
 * under the PIC/FLIP transfer's own. Water (1e-6 m²/s) at 1/256 m and 1/120 s is 1.4e-4. Our choice (no source).
 */
export const VISCOSITY_NEGLIGIBLE = 1e-3;
/** CG stops when ‖r‖₂ ≤ VISCOSITY_TOLERANCE · ‖V u*‖₂ (momentum residual relative to the momentum diffused). */
export const VISCOSITY_TOLERANCE = 1e-3;
/** CG iteration cap per step. */
export const VISCOSITY_MAX_ITERATIONS = 1000;

/**
 * True when some liquid of the scene has ν·dt/h² ≥ VISCOSITY_NEGLIGIBLE at the bake's longest substep
 * (1/(fps·substeps); the CFL condition only shortens steps). Otherwise the solver leaves the stage out, so
 * water-only bakes are bit-identical to bakes without it.
 */
export function sceneIsViscous(scene: Scene): boolean {
  const h = scene.tank.cellSize;
  const dtMax = 1 / (scene.timing.fps * scene.timing.substeps);
  const nuMax = scene.liquids.reduce((m, l) => Math.max(m, l.viscosity), 0);
  return (nuMax * dtMax) / (h * h) >= VISCOSITY_NEGLIGIBLE;
}

export interface ViscousStep {
  /** Applies one implicit viscous step of dt seconds to S.gu, S.gv. */
  run(dt: number): void;
  /**
   * After run: per known face (a face touching a solid; u faces in `u`, v faces in `v`, indexed like gu/gv), the
   * viscous impulse the liquid gave that face's solid over the step, per unit liquid density (m²·m/s per unit depth;
   * × ρ gives N·s/m). 0 elsewhere. See reaction() for why it is exactly what the liquid's momentum lost.
   */
  readonly reactionU: Float64Array;
  readonly reactionV: Float64Array;
  /** CG iterations of the last step. */
  readonly lastIterations: number;
  /** Relative residual reached by the last step. */
  readonly lastResidual: number;
}

/** Allocates the viscous step's scratch once for a scene's grid. */
export function createViscousStep(S: ViscosityGrid, scene: Scene): ViscousStep {
  const { nx, ny, nc } = S;
  const nus = Float64Array.from(scene.liquids, (l) => l.viscosity);
  const nuMax = nus.reduce((m, v) => Math.max(m, v), 0);
  const uniform = nus.every((v) => v === nus[0]);
  const f64 = () => new Float64Array(nc);
  const vol = f64(), nuC = f64(), wSum = f64(), sC = f64(), sN = f64();
  const massU = f64(), massV = f64(), invDiagU = f64(), invDiagV = f64();
  const rU = f64(), rV = f64(), zU = f64(), zV = f64(), pU = f64(), pV = f64(), qU = f64(), qV = f64();
  const txx = f64(), tyy = f64(), tn = f64();
  const unkU = new Uint8Array(nc), unkV = new Uint8Array(nc);
  const cellList = new Int32Array(nc), nodeList = new Int32Array(nc), uList = new Int32Array(nc), vList = new Int32Array(nc);
  let nCells = 0, nNodes = 0, nU = 0, nV = 0;
  let lastIterations = 0, lastResidual = 0;
  const reactionU = f64(), reactionV = f64();

  /** ν at cell centres: deposit-weighted mean of the particles' liquids (tent weights, as the density). */
  function depositViscosity(): void {
    if (uniform) { nuC.fill(nus[0]); return; }
    nuC.fill(0); wSum.fill(0);
    const { n, x, y, liquid, kernel: K } = S;
    for (let p = 0; p < n; p++) {
      K.at(x[p], y[p]);
      K.nodes(CENTRES[0], CENTRES[1]); K.splat(nuC, wSum, nus[liquid[p]]);
    }
    // a cell with density only from the solid mirror (no deposit of its own) takes the most viscous liquid
    for (let c = 0; c < nc; c++) nuC[c] = wSum[c] > 0 ? nuC[c] / wSum[c] : nuMax;
  }

  /** A face a node can couple to: an unknown, or a face on a solid (known: the solid's velocity). */
  const usableU = (c: number) => unkU[c] !== 0 || (c % nx > 0 && (S.solid[c] !== 0 || S.solid[c - 1] !== 0));
  const usableV = (c: number) => unkV[c] !== 0 || (c >= nx && (S.solid[c] !== 0 || S.solid[c - nx] !== 0));

  /** Liquid fractions, stress weights s = 2·dt·ν·V, face masses, unknown masks and the inverse Jacobi diagonal. */
  function assemble(dt: number): void {
    const { solid, dens } = S;
    const inv = S.restDensity > 0 ? 1 / S.restDensity : 0;
    depositViscosity();
    for (let j = 0; j < ny; j++) {
      for (let i = 0, c = nx * j; i < nx; i++, c++) {
        const border = i === 0 || j === 0 || i === nx - 1 || j === ny - 1;
        const r = dens[c] * inv;
        vol[c] = border || solid[c] !== 0 ? 0 : r > 1 ? 1 : r;
      }
    }
    nCells = 0; nNodes = 0; nU = 0; nV = 0;
    unkU.fill(0); unkV.fill(0); massU.fill(0); massV.fill(0); sC.fill(0); sN.fill(0);
    txx.fill(0); tyy.fill(0); tn.fill(0); pU.fill(0); pV.fill(0);
    for (let j = 1; j < ny; j++) {
      for (let i = 1, c = 1 + nx * j; i < nx; i++, c++) {
        // u face between c−1 and c; v face between c−nx and c
        const su = solid[c] !== 0 || solid[c - 1] !== 0, sv = solid[c] !== 0 || solid[c - nx] !== 0;
        massU[c] = 0.5 * (vol[c - 1] + vol[c]);
        massV[c] = 0.5 * (vol[c - nx] + vol[c]);
        if (!su && massU[c] > 0) { unkU[c] = 1; uList[nU++] = c; }
        if (!sv && massV[c] > 0) { unkV[c] = 1; vList[nV++] = c; }
      }
    }
    for (let j = 1; j < ny - 1; j++) {
      for (let i = 1, c = 1 + nx * j; i < nx - 1; i++, c++) {
        if (vol[c] > 0) { sC[c] = 2 * dt * nuC[c] * vol[c]; cellList[nCells++] = c; }
      }
    }
    // node c: the lower-left corner of cell c, shared by cells c, c−1, c−nx, c−nx−1; its faces are u[c] and
    // u[c−nx] (above and below it), v[c] and v[c−1] (right and left of it)
    for (let j = 1; j < ny; j++) {
      for (let i = 1, c = 1 + nx * j; i < nx; i++, c++) {
        const a = vol[c], b = vol[c - 1], d = vol[c - nx], e = vol[c - nx - 1];
        const vn = 0.25 * (a + b + d + e);
        if (vn === 0) continue;
        if (!usableU(c) || !usableU(c - nx) || !usableV(c) || !usableV(c - 1)) continue;
        const nu = (a * nuC[c] + b * nuC[c - 1] + d * nuC[c - nx] + e * nuC[c - nx - 1]) / (a + b + d + e);
        sN[c] = 2 * dt * nu * vn;
        nodeList[nNodes++] = c;
      }
    }
    const invH2 = S.invH * S.invH;
    for (let k = 0; k < nU; k++) {
      const c = uList[k];
      invDiagU[c] = 1 / (massU[c] + (sC[c] + sC[c - 1]) * invH2 + 0.5 * (sN[c] + (c + nx < nc ? sN[c + nx] : 0)) * invH2);
    }
    for (let k = 0; k < nV; k++) {
      const c = vList[k];
      invDiagV[c] = 1 / (massV[c] + (sC[c] + sC[c - nx]) * invH2 + 0.5 * (sN[c] + sN[c + 1]) * invH2);
    }
  }

  /**
   * Stress of (xu, xv) at every stress point, pre-multiplied by its weight:
   *   centre c: txx = s·(u_{c+1} − u_c)/h², tyy = s·(v_{c+nx} − v_c)/h²   (∂/∂u of dt·ν·V·D_xx² = s·ΔU/h²),
   *   node c:   tn = ½·s·(u_c − u_{c−nx} + v_c − v_{c−1})/h²              (2·D_xy = that sum over h).
   * (K·x) on a face then gathers its two centres and two nodes (see kx below). Points off the lists stay 0.
   */
  function stress(xu: Float64Array, xv: Float64Array): void {
    const invH2 = S.invH * S.invH;
    for (let k = 0; k < nCells; k++) {
      const c = cellList[k], s = sC[c] * invH2;
      txx[c] = s * (xu[c + 1] - xu[c]); tyy[c] = s * (xv[c + nx] - xv[c]);
    }
    for (let k = 0; k < nNodes; k++) {
      const c = nodeList[k];
      tn[c] = 0.5 * sN[c] * invH2 * (xu[c] - xu[c - nx] + xv[c] - xv[c - 1]);
    }
  }
  // (K·x) on u face c (between cells c−1, c; between nodes c, c+nx) and on v face c (cells c−nx, c; nodes c, c+1)
  const kxU = (c: number) => txx[c - 1] - txx[c] + tn[c] - tn[c + nx];
  const kxV = (c: number) => tyy[c - nx] - tyy[c] + tn[c] - tn[c + 1];

  function run(dt: number): void {
    assemble(dt);
    const gu = S.gu, gv = S.gv;
    lastIterations = 0; lastResidual = 0;
    if (nU + nV === 0) return;
    // residual of the guess u = u*: V u* − (V u* + K u*) = −K u* (known faces enter K at their fixed values)
    stress(gu, gv);
    let bb = 0, rz = 0, rr = 0;
    for (let k = 0; k < nU; k++) {
      const c = uList[k], m = massU[c] * gu[c];
      bb += m * m;
      const r = -kxU(c); rU[c] = r; rr += r * r;
      const z = r * invDiagU[c]; pU[c] = z; rz += r * z;
    }
    for (let k = 0; k < nV; k++) {
      const c = vList[k], m = massV[c] * gv[c];
      bb += m * m;
      const r = -kxV(c); rV[c] = r; rr += r * r;
      const z = r * invDiagV[c]; pV[c] = z; rz += r * z;
    }
    const stop2 = VISCOSITY_TOLERANCE * VISCOSITY_TOLERANCE * bb;
    let it = 0;
    while (rr > stop2 && it < VISCOSITY_MAX_ITERATIONS) {
      // q = A p = V p + K p (p is zero on known faces)
      stress(pU, pV);
      let pq = 0;
      for (let k = 0; k < nU; k++) {
        const c = uList[k], pc = pU[c];
        const q = massU[c] * pc + (txx[c - 1] - txx[c] + tn[c] - tn[c + nx]); // V·p + (K·p) on u face c
        qU[c] = q; pq += pc * q;
      }
      for (let k = 0; k < nV; k++) {
        const c = vList[k], pc = pV[c];
        const q = massV[c] * pc + (tyy[c - nx] - tyy[c] + tn[c] - tn[c + 1]); // V·p + (K·p) on v face c
        qV[c] = q; pq += pc * q;
      }
      if (!(pq > 0)) break;
      const alpha = rz / pq;
      let rz1 = 0;
      rr = 0;
      for (let k = 0; k < nU; k++) {
        const c = uList[k];
        gu[c] += alpha * pU[c];
        const r = rU[c] - alpha * qU[c]; rU[c] = r; rr += r * r;
        const z = r * invDiagU[c]; zU[c] = z; rz1 += r * z;
      }
      for (let k = 0; k < nV; k++) {
        const c = vList[k];
        gv[c] += alpha * pV[c];
        const r = rV[c] - alpha * qV[c]; rV[c] = r; rr += r * r;
        const z = r * invDiagV[c]; zV[c] = z; rz1 += r * z;
      }
      const beta = rz1 / rz;
      rz = rz1;
      for (let k = 0; k < nU; k++) { const c = uList[k]; pU[c] = zU[c] + beta * pU[c]; }
      for (let k = 0; k < nV; k++) { const c = vList[k]; pV[c] = zV[c] + beta * pV[c]; }
      it++;
    }
    lastIterations = it;
    lastResidual = bb > 0 ? Math.sqrt(rr / bb) : 0;
    reaction();
  }

  /**
   * The solids' share of the step (Newton's third law, what free props feel as viscous drag): K annihilates a
   * uniform velocity (no strain), so Σ over all faces of (K·u)_f = 0 and the liquid's momentum change,
   * h²·Σ_unknown V_f (u_f − u*_f) = −h²·Σ_unknown (K·u)_f, equals h²·Σ_known (K·u)_f: the stress the known
   * (solid) faces exert. Each solid takes the opposite, −h²·(K·u)_f on its faces (up to the CG tolerance).
   */
  function reaction(): void {
    reactionU.fill(0); reactionV.fill(0);
    if (nU + nV === 0) return;
    stress(S.gu, S.gv);
    const h2 = S.h * S.h, { solid } = S;
    for (let j = 1; j < ny - 1; j++) {
      for (let i = 1, c = 1 + nx * j; i < nx - 1; i++, c++) {
        if (unkU[c] === 0 && (solid[c] !== 0 || solid[c - 1] !== 0)) reactionU[c] = -h2 * kxU(c);
        if (unkV[c] === 0 && (solid[c] !== 0 || solid[c - nx] !== 0)) reactionV[c] = -h2 * kxV(c);
      }
    }
  }

  return {
    run, reactionU, reactionV,
    get lastIterations() { return lastIterations; },
    get lastResidual() { return lastResidual; },
  };
}
