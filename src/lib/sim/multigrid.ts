// Multigrid preconditioner for the projection's conjugate gradient: one geometric V-cycle per CG
// iteration, after McAdams, Sifakis & Teran 2010, "A parallel multigrid Poisson solver for fluids
// simulation on large grids" (Eurographics/ACM SIGGRAPH Symposium on Computer Animation), in 2D:
// - coarse cells cover 2×2 fine cells; a coarse cell is air (Dirichlet) if any child is air, else liquid if
//   any child is liquid, else solid (Neumann); every coarse level is the 5-point operator of its own labels
//   (rediscretised, not Galerkin), in the same "stencil" scaling as the fine one (Σ over non-solid
//   neighbours of q_c − q_n, q = 0 in air);
// - prolongation is bilinear interpolation between cell centres (weights 9/16, 3/16, 3/16, 1/16) and
//   restriction its transpose (so that the V-cycle is a symmetric operator, as CG needs);
// - smoothing is damped Jacobi (ω = 2/3) on interior cells and extra Gauss–Seidel sweeps on the cells of a
//   band along the boundary (air or solid within the 3×3 neighbourhood), before and after; the post-smoother
//   runs the pre-smoother's steps in reverse (the V-cycle stays symmetric positive definite);
// - the coarsest level is solved approximately by symmetric Gauss–Seidel sweeps.
// The finest level is the projection's own matrix (the ghost-fluid face weights 1/θ on its diagonal);
// the coarse levels see the first-order free surface. The rigid-body coupling term (rigid.ts) is left to CG,
// as MIC(0) leaves it.
// Gauss–Seidel sweeps run in red–black order (cells of one colour do not touch each other), and every
// other step is a gather per cell, so that each step gives the same result whatever order (or partition
// of the cells) it runs in.
import { FLUID, AIR, SOLID, type ProjectionGrid } from './pressure';

/** Damped Jacobi weight on interior cells (McAdams et al. 2010; the usual 2/3 for the 5-point Laplacian). */
const JACOBI_OMEGA = 2 / 3;
/** Red–black Gauss–Seidel passes on the boundary band before and after the interior Jacobi (measured here, see bench). */
const BOUNDARY_PASSES = 2;
/** Interior damped Jacobi passes per smoothing (measured here, see bench). */
const INTERIOR_PASSES = 1;
/** Symmetric Gauss–Seidel sweeps (forward + backward) on the coarsest level. */
const COARSEST_SWEEPS = 20;

interface Level {
  nx: number; ny: number;
  type: Uint8Array;
  diag: Float64Array;
  /** Solution, right-hand side, residual scratch (0 outside liquid). */
  x: Float64Array; b: Float64Array; t: Float64Array;
  /** Liquid cells; boundary-band cells of each colour; interior cells (all four neighbours and the diagonal ones liquid). */
  cells: Int32Array; cellCount: number;
  red: Int32Array; redCount: number;
  black: Int32Array; blackCount: number;
  inner: Int32Array; innerCount: number;
}

export interface MultigridPreconditioner {
  /** Rebuilds the levels from the grid's current cell types and diagonal (after assembleSystem). */
  setup(): void;
  /** z = M⁻¹·r by one V-cycle from zero: reads r on the liquid cells, writes z there. */
  apply(r: Float64Array, z: Float64Array): void;
  /** Number of levels (the finest included). */
  readonly depth: number;
  /** Size of the grid it was built for. */
  readonly nx: number; readonly ny: number;
}

function newLevel(nx: number, ny: number): Level {
  const n = nx * ny;
  return {
    nx, ny, type: new Uint8Array(n), diag: new Float64Array(n), x: new Float64Array(n), b: new Float64Array(n), t: new Float64Array(n),
    cells: new Int32Array(n), cellCount: 0, red: new Int32Array(n), redCount: 0, black: new Int32Array(n), blackCount: 0,
    inner: new Int32Array(n), innerCount: 0,
  };
}

/** Sizes of a coarse level: interior cells 1..nx−2 map to 1..(nx−1)>>1, with a ring of non-liquid cells around. */
const coarseSize = (n: number): number => ((n - 1) >> 1) + 2;

export function createMultigrid(g: ProjectionGrid): MultigridPreconditioner {
  const levels: Level[] = [];
  // the finest level shares the grid's types, diagonal and liquid list; x and b are given per apply
  const fine = newLevel(g.nx, g.ny);
  fine.type = g.type; fine.diag = g.diag; fine.cells = g.fluid;
  levels.push(fine);
  for (let nx = g.nx, ny = g.ny; (nx - 2 > 4 || ny - 2 > 4) && nx - 2 >= 2 && ny - 2 >= 2;) {
    nx = coarseSize(nx); ny = coarseSize(ny);
    levels.push(newLevel(nx, ny));
  }

  function classify(L: Level): void {
    const { nx, type, cells, cellCount, red, black, inner } = L;
    let nr = 0, nb = 0, ni = 0;
    for (let k = 0; k < cellCount; k++) {
      const c = cells[k];
      const band = type[c - 1] !== FLUID || type[c + 1] !== FLUID || type[c - nx] !== FLUID || type[c + nx] !== FLUID ||
        type[c - nx - 1] !== FLUID || type[c - nx + 1] !== FLUID || type[c + nx - 1] !== FLUID || type[c + nx + 1] !== FLUID;
      if (!band) inner[ni++] = c;
      else if ((((c % nx) + ((c / nx) | 0)) & 1) === 0) red[nr++] = c;
      else black[nb++] = c;
    }
    L.redCount = nr; L.blackCount = nb; L.innerCount = ni;
  }

  /** Labels, diagonal and liquid list of level F+1 from level F. */
  function coarsen(F: Level, C: Level): void {
    const { nx: fx, ny: fy, type: ft } = F;
    const { nx, ny, type, diag, cells } = C;
    for (let J = 0; J < ny; J++) {
      for (let I = 0; I < nx; I++) {
        let air = false, liquid = false;
        for (let j = 2 * J - 1; j <= 2 * J; j++) {
          if (j < 0 || j >= fy) continue;
          for (let i = 2 * I - 1; i <= 2 * I; i++) {
            if (i < 0 || i >= fx) continue;
            const t = ft[i + fx * j];
            if (t === AIR) air = true; else if (t === FLUID) liquid = true;
          }
        }
        // the ring stays non-liquid (it covers only the fine ring, or nothing)
        const ring = I === 0 || J === 0 || I === nx - 1 || J === ny - 1;
        type[I + nx * J] = air ? AIR : liquid && !ring ? FLUID : liquid ? AIR : SOLID;
      }
    }
    let n = 0;
    for (let J = 1; J < ny - 1; J++) {
      for (let I = 1, c = 1 + nx * J; I < nx - 1; I++, c++) {
        if (type[c] !== FLUID) continue;
        cells[n++] = c;
        // every non-solid neighbour (liquid or air) is one face of weight 1
        diag[c] = (type[c - 1] !== SOLID ? 1 : 0) + (type[c + 1] !== SOLID ? 1 : 0) + (type[c - nx] !== SOLID ? 1 : 0) + (type[c + nx] !== SOLID ? 1 : 0);
      }
    }
    C.cellCount = n;
  }

  function setup(): void {
    fine.cellCount = g.fluidCount;
    classify(fine);
    fine.t.fill(0);
    for (let l = 1; l < levels.length; l++) {
      coarsen(levels[l - 1], levels[l]);
      classify(levels[l]);
      levels[l].t.fill(0);
      levels[l].x.fill(0);
    }
  }

  /** One Gauss–Seidel pass over a list of cells: x_c = (b_c + Σ x_n)/A_cc. */
  function gsPass(L: Level, list: Int32Array, count: number, backward: boolean): void {
    const { nx, x, b, diag } = L;
    if (backward) {
      for (let k = count - 1; k >= 0; k--) {
        const c = list[k];
        const d = diag[c];
        if (d > 0) x[c] = (b[c] + x[c - 1] + x[c + 1] + x[c - nx] + x[c + nx]) / d;
      }
    } else {
      for (let k = 0; k < count; k++) {
        const c = list[k];
        const d = diag[c];
        if (d > 0) x[c] = (b[c] + x[c - 1] + x[c + 1] + x[c - nx] + x[c + nx]) / d;
      }
    }
  }

  function boundary(L: Level, redFirst: boolean): void {
    for (let p = 0; p < BOUNDARY_PASSES; p++) {
      if (redFirst) { gsPass(L, L.red, L.redCount, false); gsPass(L, L.black, L.blackCount, false); }
      else { gsPass(L, L.black, L.blackCount, false); gsPass(L, L.red, L.redCount, false); }
    }
  }

  /** Damped Jacobi on the interior cells (diagonal 4 there). */
  function interior(L: Level): void {
    const { nx, x, b, t, inner, innerCount } = L;
    const w = JACOBI_OMEGA / 4;
    for (let p = 0; p < INTERIOR_PASSES; p++) {
      for (let k = 0; k < innerCount; k++) {
        const c = inner[k];
        t[c] = b[c] - (4 * x[c] - x[c - 1] - x[c + 1] - x[c - nx] - x[c + nx]);
      }
      for (let k = 0; k < innerCount; k++) { const c = inner[k]; x[c] += w * t[c]; }
    }
  }

  /** t = b − A·x on the liquid cells of L. */
  function residual(L: Level): void {
    const { nx, x, b, t, diag, cells, cellCount } = L;
    for (let k = 0; k < cellCount; k++) {
      const c = cells[k];
      t[c] = b[c] - (diag[c] * x[c] - x[c - 1] - x[c + 1] - x[c - nx] - x[c + nx]);
    }
  }

  /** b_C = Pᵀ·t_F: each coarse liquid cell gathers the 4×4 fine cells around it, weights (1, 3, 3, 1)/4 per axis. */
  function restrict(F: Level, C: Level): void {
    const { nx: fx, ny: fy, t } = F;
    const { nx, b, cells, cellCount } = C;
    for (let k = 0, J = 0, rowEnd = nx; k < cellCount; k++) {
      const c = cells[k];
      while (c >= rowEnd) { J++; rowEnd += nx; }
      const I = c - (rowEnd - nx);
      let s = 0;
      for (let dj = 0; dj < 4; dj++) {
        const j = 2 * J - 2 + dj;
        if (j < 0 || j >= fy) continue;
        const wj = dj === 0 || dj === 3 ? 0.25 : 0.75;
        const row = fx * j;
        let sr = 0;
        for (let di = 0; di < 4; di++) {
          const i = 2 * I - 2 + di;
          if (i < 0 || i >= fx) continue;
          sr += (di === 0 || di === 3 ? 0.25 : 0.75) * t[row + i];
        }
        s += wj * sr;
      }
      b[c] = s;
    }
  }

  /** x_F += P·x_C: bilinear between the coarse centres (3/4 from the parent, 1/4 from the next one out, per axis). */
  function prolong(C: Level, F: Level): void {
    const { nx, x: xc } = C;
    const { nx: fx, x, cells, cellCount } = F;
    for (let k = 0, j = 0, rowEnd = fx; k < cellCount; k++) {
      const c = cells[k];
      while (c >= rowEnd) { j++; rowEnd += fx; }
      const i = c - (rowEnd - fx);
      const I = (i + 1) >> 1, J = (j + 1) >> 1;
      const I2 = i & 1 ? I - 1 : I + 1, J2 = j & 1 ? J - 1 : J + 1;
      const r = nx * J, r2 = nx * J2;
      x[c] += 0.5625 * xc[r + I] + 0.1875 * (xc[r + I2] + xc[r2 + I]) + 0.0625 * xc[r2 + I2];
    }
  }

  function vcycle(l: number): void {
    const L = levels[l];
    const { x, cells, cellCount } = L;
    for (let k = 0; k < cellCount; k++) x[cells[k]] = 0;
    if (l === levels.length - 1) {
      for (let s = 0; s < COARSEST_SWEEPS; s++) { gsPass(L, cells, cellCount, false); gsPass(L, cells, cellCount, true); }
      return;
    }
    boundary(L, true); interior(L); boundary(L, true);
    residual(L);
    const C = levels[l + 1];
    restrict(L, C);
    vcycle(l + 1);
    prolong(C, L);
    // the adjoint of the pre-smoother: its steps in reverse order, each Gauss–Seidel pass reversed
    boundary(L, false); interior(L); boundary(L, false);
  }

  function apply(r: Float64Array, z: Float64Array): void {
    fine.b = r; fine.x = z;
    vcycle(0);
  }

  return { setup, apply, depth: levels.length, nx: g.nx, ny: g.ny };
}
