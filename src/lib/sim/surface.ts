// Where the free surface lies inside the cells, for the ghost-fluid pressure boundary (Gibou, Fedkiw,
// Cheng & Kang 2002, "A second-order-accurate symmetric discretization of the Poisson equation on
// irregular domains", J. Comput. Phys. 176; used for free surfaces by Enright, Nguyen, Gibou & Fedkiw 2003,
// "Using the particle level set method and a second order accurate pressure boundary condition for free
// surface flows", ASME FEDSM2003-45144).
//
// The surface is the ½ρ₀ iso-contour of the cell-centred particle density (beside walls and props, of the
// density over the share of ρ₀ the cell reads at rest, FlipState.restShare) (the same contour the liquidArea
// statistic measures). The density is a bilinear (tent-kernel) deposit, so beside a flat, axis-aligned
// surface at signed distance s (cells, positive into the air) from a cell centre it reads ρ/ρ₀ = F(−s) with
// F the tent's cumulative distribution:
//   F(t) = (1 + t)²/2 for −1 ≤ t ≤ 0,  1 − (1 − t)²/2 for 0 ≤ t ≤ 1.
// Inverting F gives a signed distance φ = −F⁻¹(ρ/ρ₀)·h (m; negative in liquid, clamped to ±h) that is exact
// for such a surface, and the ghost-fluid fraction θ = φ_l/(φ_l − φ_a) (the surface's distance from the
// liquid cell centre along the face normal, in cells) is then exact too.
//
// Cells holding particles but less than half the rest density lie above the surface (φ ≥ 0): for the
// projection they are air (q = 0); their particles take the velocity of the faces they touch, as spray does.
import { FLUID as FLUID_CELL, AIR as AIR_CELL, type ProjectionGrid } from './pressure';

// Local copies for the per-cell loops (an imported binding is a getter call when tsx runs this as CommonJS; stages.ts).
const FLUID = FLUID_CELL, AIR = AIR_CELL;

/** Smallest θ used: keeps the matrix conditioned (Gibou et al. 2002 clamp θ small; 0.01 is common practice, no source). */
export const THETA_MIN = 0.01;

/** State the surface stage reads and writes (FlipState implements it). */
export interface SurfaceGrid extends ProjectionGrid {
  h: number;
  dens: Float64Array;
  restDensity: number;
  /** Signed distance to the free surface at cell centres, m (negative in liquid, |φ| ≤ h). */
  phi: Float64Array;
  /** The drift correction's divergence target per cell (m/s; stages.ts, driftTarget). */
  driftTarget: Float64Array;
  /** Share of ρ₀ a cell reads with the liquid around it at rest (1 away from solids; stages.ts, restShare). */
  restShare: Float64Array;
}

/** Signed distance in cells from a density ratio r = ρ/ρ₀ (inverse of the tent CDF, negated). */
export function densityToDistance(r: number): number {
  if (r <= 0) return 1;
  if (r >= 1) return -1;
  const t = r < 0.5 ? Math.sqrt(2 * r) - 1 : 1 - Math.sqrt(2 * (1 - r));
  return -t;
}

/**
 * Ghost-fluid fraction for a face between a liquid cell (φ_l < 0) and an air cell: θ = φ_l/(φ_l − φ_a),
 * clamped to [THETA_MIN, 1]; 1 (surface at the air cell's centre, the first-order rule) when φ_a ≤ 0.
 */
export function ghostTheta(phiLiquid: number, phiAir: number): number {
  if (!(phiAir > 0)) return 1;
  const t = phiLiquid / (phiLiquid - phiAir);
  return t < THETA_MIN ? THETA_MIN : t > 1 ? 1 : t;
}

/**
 * The surface stage: φ from the density, cells above the surface re-marked air, and for every face its
 * pressure weight for the projection (see pressure.ts): 0 at solids, 1 between liquid cells, 1/θ between
 * liquid and air. Drift targets of cells that now touch air follow the free-surface rule (only over-dense
 * cells are driven). Before ρ₀ is known every face weight is the first-order one.
 */
export function freeSurface(S: SurfaceGrid): void {
  const { nx, ny, dens, type, phi, open, driftTarget: target, restShare } = S;
  const wu = S.faceU, wv = S.faceV;
  const nc = nx * ny;
  const rest = S.restDensity;
  if (rest > 0) {
    const inv = 1 / rest, h = S.h;
    for (let c = 0; c < nc; c++) phi[c] = densityToDistance((dens[c] * inv) / restShare[c]) * h;
    for (let c = 0; c < nc; c++) if (type[c] === FLUID && phi[c] >= 0) type[c] = AIR;
  } else {
    phi.fill(-S.h);
  }
  for (let j = 0; j < ny; j++) {
    for (let i = 0, c = nx * j; i < nx; i++, c++) {
      wu[c] = i > 0 ? faceWeight(type, phi, open, c - 1, c, rest > 0) : 0;
      wv[c] = j > 0 ? faceWeight(type, phi, open, c - nx, c, rest > 0) : 0;
    }
  }
  if (rest > 0) {
    for (let j = 1; j < ny - 1; j++) for (let i = 1, c = 1 + nx * j; i < nx - 1; i++, c++) {
      if (type[c] !== FLUID || target[c] >= 0) continue;
      if (type[c - 1] === AIR || type[c + 1] === AIR || type[c - nx] === AIR || type[c + nx] === AIR) target[c] = 0;
    }
  }
}

function faceWeight(type: Uint8Array, phi: Float64Array, open: Float64Array, a: number, b: number, ghost: boolean): number {
  if (open[a] === 0 || open[b] === 0) return 0;
  const fa = type[a] === FLUID, fb = type[b] === FLUID;
  if (fa && fb) return 1;
  if (!fa && !fb) return 0;
  if (!ghost) return 1;
  return fa ? 1 / ghostTheta(phi[a], phi[b]) : 1 / ghostTheta(phi[b], phi[a]);
}
