// Pressure projection on the MAC grid: make the velocity field divergence-free with solid faces keeping
// their solid velocity. The density drift correction is not part of it: it is solved with the same matrix
// (solvePoisson) into a displacement of the particles that never enters their velocities (stages.ts).
// Two solvers of the same system: over-relaxed Gauss–Seidel (the textbook sweep) and conjugate
// gradient preconditioned with modified incomplete Cholesky, MIC(0) (Bridson, "Fluid Simulation
// for Computer Graphics", 2nd ed., 2015, §5.4; tuning τ = 0.97, σ = 0.25 from the same section).
//
// Units: q is the pressure scaled to a velocity, q = p·dt/(ρ·h) (m/s), so that the discrete system is
//   Σ_{n non-solid} (q_c − q_n) = b_c,   b_c = −D_c,   D_c = u_{i+1} − u_i + v_{j+1} − v_j (m/s),
// with q = 0 in air cells (free surface, Dirichlet) and solid neighbours dropped (Neumann).
// The velocity update is u_face −= q_right − q_left (and likewise for v).
//
// Free surface, ghost-fluid method (Gibou, Fedkiw, Cheng & Kang 2002; Enright, Nguyen, Gibou & Fedkiw 2003):
// q = 0 is imposed where the surface actually crosses the line between a liquid cell and its air
// neighbour, at the fraction θ of a cell from the liquid cell's centre (surface.ts). The ghost pressure in
// the air cell is then q_g = q_c·(1 − 1/θ), so that face's term is (q_c − q_g) = q_c/θ: each face carries a
// weight w_f (0 at a solid, 1 between liquid cells, 1/θ between liquid and air), the diagonal is
// Σ_f w_f, the off-diagonals stay −1 between liquid cells (the matrix stays symmetric), and the velocity
// update is u_f −= w_f·(q_right − q_left) with q = 0 in air. θ = 1 everywhere is the first-order scheme.
//
// A third solver is the same CG with a multigrid V-cycle as its preconditioner (McAdams, Sifakis & Teran
// 2010; multigrid.ts): its iteration count stays about flat as the grid grows, where MIC(0)'s grows.
import { createMultigrid, type MultigridPreconditioner } from './multigrid';

export const FLUID = 0;
export const AIR = 1;
export const SOLID = 2;

/** The grid arrays the projection reads and writes (cell c = i + nx·j; gu[c] left face, gv[c] bottom face). */
export interface ProjectionGrid {
  nx: number;
  ny: number;
  gu: Float64Array;
  gv: Float64Array;
  /** 1 for a non-solid cell, 0 for a solid one. */
  open: Float64Array;
  /** Pressure weight of each cell's left face (faceU) and bottom face (faceV): 0, 1 or 1/θ (see above). */
  faceU: Float64Array;
  faceV: Float64Array;
  type: Uint8Array;
  /** Fluid cells in increasing index order, and their number. */
  fluid: Int32Array;
  fluidCount: number;
  /** Scaled pressure q (m/s); kept between steps as the CG starting guess. */
  q: Float64Array;
  // scratch for CG (length nc, zero outside fluid cells)
  res: Float64Array;
  zv: Float64Array;
  dir: Float64Array;
  adir: Float64Array;
  precon: Float64Array;
  diag: Float64Array;
  /** Iterations (sweeps or CG steps) used by the last solve. */
  lastIterations: number;
}


/**
 * An extra symmetric positive semi-definite term C of the projection's matrix, solved as (A + C)·q = −D:
 * rigid bodies coupled to the liquid (rigid.ts). CG needs only products with it.
 */
export interface Coupling {
  /** out[c] += sign·(C·x)[c] on the cells C touches; returns xᵀ·C·x. */
  apply(x: Float64Array, out: Float64Array, sign: number): number;
  /** After the solve, with its q: moves what is coupled (the bodies' velocities and their faces). */
  finish(q: Float64Array): void;
}

/** Builds the fluid list, the diagonal (sum of the face weights) and b; returns ‖b‖₂. */
export function assembleSystem(g: ProjectionGrid): number {
  preconditionerReady.delete(g);
  const { nx, ny, type, faceU: wu, faceV: wv, gu: u, gv: v, fluid, diag, res } = g;
  let n = 0, bb = 0;
  for (let j = 1; j < ny - 1; j++) {
    let c = 1 + nx * j;
    for (let i = 1; i < nx - 1; i++, c++) {
      if (type[c] !== FLUID) continue;
      fluid[n++] = c;
      diag[c] = wu[c] + wu[c + 1] + wv[c] + wv[c + nx];
      // b_c = −D_c
      const b = -(u[c + 1] - u[c] + v[c + nx] - v[c]);
      res[c] = b;
      bb += b * b;
    }
  }
  g.fluidCount = n;
  return Math.sqrt(bb);
}

/** ‖D‖₂ over fluid cells with the current velocities (the residual of the solve just done). */
export function divergenceResidual(g: ProjectionGrid): number {
  const { nx, gu: u, gv: v, fluid, fluidCount } = g;
  let rr = 0;
  for (let k = 0; k < fluidCount; k++) {
    const c = fluid[k];
    const r = u[c + 1] - u[c] + v[c + nx] - v[c];
    rr += r * r;
  }
  return Math.sqrt(rr);
}

/**
 * Over-relaxed Gauss–Seidel on the velocities, cold start (q = 0), at most `maxSweeps` sweeps,
 * stopping early once the running residual of a sweep is below tolerance·‖b‖. Returns ‖b − A q‖₂/‖b‖₂.
 * Per fluid cell: corr = −ω·D_c/Σ w_f; q_c += corr; each face f moves by w_f·corr outward.
 */
export function projectGaussSeidel(g: ProjectionGrid, maxSweeps: number, omega: number, tolerance: number): number {
  const bNorm = assembleSystem(g);
  lastPreconditioner.delete(g);
  const { nx, gu: u, gv: v, faceU: wu, faceV: wv, fluid, fluidCount, q, diag } = g;
  for (let k = 0; k < fluidCount; k++) q[fluid[k]] = 0;
  g.lastIterations = 0;
  if (bNorm === 0) return 0;
  const stop2 = tolerance * tolerance * bNorm * bNorm;
  let it = 0;
  for (; it < maxSweeps; it++) {
    let running = 0;
    for (let k = 0; k < fluidCount; k++) {
      const c = fluid[k];
      const sum = diag[c];
      if (sum === 0) continue;
      const r = -(u[c + 1] - u[c] + v[c + nx] - v[c]);
      running += r * r;
      const corr = (omega * r) / sum;
      q[c] += corr;
      u[c] -= wu[c] * corr;
      u[c + 1] += wu[c + 1] * corr;
      v[c] -= wv[c] * corr;
      v[c + nx] += wv[c + nx] * corr;
    }
    if (running <= stop2) { it++; break; }
  }
  g.lastIterations = it;
  return divergenceResidual(g) / bNorm;
}

/**
 * MIC(0) preconditioner for the 5-point matrix (Bridson 2015, §5.4):
 *   e_c = A_cc − (a_{c−1}·P_{c−1})² − (a_{c−nx}·P_{c−nx})² − τ(a_{c−1}a'_{c−1}P²_{c−1} + a_{c−nx}a'_{c−nx}P²_{c−nx}),
 *   P_c = 1/√e_c (e_c replaced by A_cc when e_c < σ·A_cc).
 * With off-diagonals −1 between fluid cells and P = 0 outside fluid, the products reduce to fluid flags.
 */
function buildMic0(g: ProjectionGrid): void {
  const { nx, type, fluid, fluidCount, precon, diag } = g;
  const tau = 0.97, sigma = 0.25;
  for (let k = 0; k < fluidCount; k++) {
    const c = fluid[k];
    const pl = precon[c - 1], pb = precon[c - nx];
    const pl2 = pl * pl, pb2 = pb * pb;
    const d = diag[c];
    let e = d - pl2 - pb2 - tau * ((type[c - 1 + nx] === FLUID ? pl2 : 0) + (type[c - nx + 1] === FLUID ? pb2 : 0));
    if (e < sigma * d) e = d;
    precon[c] = e > 0 ? 1 / Math.sqrt(e) : 0;
  }
}

/** z = M⁻¹ r with M = (L)(Lᵀ) from MIC(0): forward then backward substitution; zv is the forward scratch too. */
export function applyMic0(g: ProjectionGrid): void {
  const { nx, fluid, fluidCount, precon, res, zv } = g;
  // forward: t_c = r_c + P_{c−1} t_{c−1} + P_{c−nx} t_{c−nx};  y_c = t_c·P_c
  for (let k = 0; k < fluidCount; k++) {
    const c = fluid[k];
    zv[c] = (res[c] + precon[c - 1] * zv[c - 1] + precon[c - nx] * zv[c - nx]) * precon[c];
  }
  // backward: z_c = (y_c + P_c (z_{c+1} + z_{c+nx}))·P_c, neighbours outside fluid hold 0
  for (let k = fluidCount - 1; k >= 0; k--) {
    const c = fluid[k];
    const pc = precon[c];
    zv[c] = (zv[c] + pc * (zv[c + 1] + zv[c + nx])) * pc;
  }
}

/** How CG is preconditioned: z = M⁻¹·r, from g.res into g.zv. */
export type Preconditioner = 'mic0' | 'multigrid';

export interface PreconditionerOps { setup(): void; apply(): void }

/**
 * The preconditioner built for each grid's current matrix (cleared by assembleSystem): solvePoisson, on the
 * last projection's matrix, reuses it instead of building it again (the same numbers either way).
 */
const preconditionerReady = new WeakMap<ProjectionGrid, Preconditioner>();

const multigrids = new WeakMap<ProjectionGrid, MultigridPreconditioner>();
/** The preconditioner of each grid's last projection: solvePoisson uses the same one. */
const lastPreconditioner = new WeakMap<ProjectionGrid, Preconditioner>();

/**
 * Another way to compute applyMic0's z = M⁻¹ r with the same bytes, per grid (parallel.ts: on several threads):
 * prepare() runs after each MIC(0) build, apply() in place of applyMic0.
 */
export interface Mic0Applier { prepare(): void; apply(): void }
const mic0Appliers = new WeakMap<ProjectionGrid, Mic0Applier>();

/** Makes CG on grid g apply its MIC(0) preconditioner with `applier` (null: applyMic0 again). */
export function useMic0Applier(g: ProjectionGrid, applier: Mic0Applier | null): void {
  if (applier) mic0Appliers.set(g, applier);
  else mic0Appliers.delete(g);
}

function preconditionerOps(g: ProjectionGrid, kind: Preconditioner): PreconditionerOps {
  const once = (build: () => void) => () => {
    if (preconditionerReady.get(g) === kind) return;
    build();
    preconditionerReady.set(g, kind);
  };
  if (kind === 'mic0') {
    const threaded = mic0Appliers.get(g);
    if (threaded) return { setup: once(() => { buildMic0(g); threaded.prepare(); }), apply: () => threaded.apply() };
    return { setup: once(() => buildMic0(g)), apply: () => applyMic0(g) };
  }
  let mg = multigrids.get(g);
  if (!mg || mg.nx !== g.nx || mg.ny !== g.ny) { mg = createMultigrid(g); multigrids.set(g, mg); }
  const m = mg;
  return { setup: once(() => m.setup()), apply: () => m.apply(g.res, g.zv) };
}

/**
 * Conjugate gradient with MIC(0) preconditioning (Bridson 2015, Fig. 5.x "PCG"): warm-started from
 * the previous step's q (rescaled by the caller), stops when ‖r‖₂ ≤ tolerance·‖b‖₂ or after maxIterations.
 * Then applies the pressure gradient to the open faces around fluid cells. Returns the relative residual.
 */
export function projectPcgMic0(g: ProjectionGrid, maxIterations: number, tolerance: number, coupling?: Coupling): number {
  return projectPcg(g, 'mic0', maxIterations, tolerance, coupling);
}

/** The same projection as projectPcgMic0, with CG preconditioned by a multigrid V-cycle (multigrid.ts). */
export function projectPcgMultigrid(g: ProjectionGrid, maxIterations: number, tolerance: number, coupling?: Coupling): number {
  return projectPcg(g, 'multigrid', maxIterations, tolerance, coupling);
}

function projectPcg(g: ProjectionGrid, kind: Preconditioner, maxIterations: number, tolerance: number, coupling?: Coupling): number {
  const bNorm = assembleSystem(g);
  const { fluid, fluidCount, q } = g;
  g.lastIterations = 0;
  lastPreconditioner.set(g, kind);
  if (bNorm === 0) {
    for (let k = 0; k < fluidCount; k++) q[fluid[k]] = 0;
    coupling?.finish(q);
    return 0;
  }
  // q outside fluid must be 0 (air Dirichlet); clear stale values from cells that were fluid before.
  clearOutsideFluid(g, q);
  const it = pcgSolve(g, q, bNorm, maxIterations, tolerance, preconditionerOps(g, kind), coupling);
  applyPressureGradient(g);
  coupling?.finish(q);
  g.lastIterations = it;
  return divergenceResidual(g) / bNorm;
}

/**
 * Solves A·x = rhs with the last projection's matrix (its fluid cells and face weights), until
 * ‖r‖₂ ≤ tolerance·‖rhs‖₂ or maxIterations: the drift correction's displacement potential (stages.ts,
 * correctPositions). Starts from x as given on the fluid cells (a warm start; 0 elsewhere). Uses the CG
 * scratch (rewritten by every projection) and leaves q and the grid velocities untouched. Preconditioned as
 * the last projection was (MIC(0) after Gauss–Seidel).
 * Returns the relative residual reached.
 */
export function solvePoisson(g: ProjectionGrid, x: Float64Array, rhs: Float64Array, maxIterations: number, tolerance: number): number {
  const { fluid, fluidCount, res } = g;
  clearOutsideFluid(g, x);
  let bb = 0;
  for (let k = 0; k < fluidCount; k++) { const c = fluid[k]; const b = rhs[c]; res[c] = b; bb += b * b; }
  const bNorm = Math.sqrt(bb);
  if (bNorm === 0) { for (let k = 0; k < fluidCount; k++) x[fluid[k]] = 0; return 0; }
  pcgSolve(g, x, bNorm, maxIterations, tolerance, preconditionerOps(g, lastPreconditioner.get(g) ?? 'mic0'));
  let rr = 0;
  for (let k = 0; k < fluidCount; k++) rr += res[fluid[k]] ** 2;
  return Math.sqrt(rr) / bNorm;
}

/** Zeroes x and the CG scratch outside the fluid cells (Dirichlet q = 0 in air; neighbours read as 0). */
function clearOutsideFluid(g: ProjectionGrid, x: Float64Array): void {
  const { type, zv, dir, precon } = g;
  const nc = g.nx * g.ny;
  for (let c = 0; c < nc; c++) if (type[c] !== FLUID) { x[c] = 0; zv[c] = 0; dir[c] = 0; precon[c] = 0; }
}

/**
 * Another implementation of pcgSolve with the same bytes, per grid (parallel.ts: on several threads): returns
 * the iterations; `here` runs pcgSolve's own loop instead (and returns its iterations).
 */
export type CgSolver = (
  x: Float64Array, bNorm: number, maxIterations: number, tolerance: number, pre: PreconditionerOps, coupling: Coupling | undefined, here: () => number,
) => number;
const cgSolvers = new WeakMap<ProjectionGrid, CgSolver>();

/** Makes CG on grid g run `solver` (null: pcgSolve again). */
export function useCgSolver(g: ProjectionGrid, solver: CgSolver | null): void {
  if (solver) cgSolvers.set(g, solver);
  else cgSolvers.delete(g);
}

/**
 * PCG on (A + C)·x = b over the fluid cells (C: the optional coupling): on entry res holds b and x the starting guess (0 outside fluid);
 * on exit x is the solution and res = b − A·x. Returns the iterations used.
 */
function pcgSolve(
  g: ProjectionGrid, x: Float64Array, bNorm: number, maxIterations: number, tolerance: number, pre: PreconditionerOps, coupling?: Coupling,
): number {
  const other = cgSolvers.get(g);
  if (other) return other(x, bNorm, maxIterations, tolerance, pre, coupling, () => pcgSolveHere(g, x, bNorm, maxIterations, tolerance, pre, coupling));
  return pcgSolveHere(g, x, bNorm, maxIterations, tolerance, pre, coupling);
}

/** pcgSolve on this thread. */
function pcgSolveHere(
  g: ProjectionGrid, x: Float64Array, bNorm: number, maxIterations: number, tolerance: number, pre: PreconditionerOps, coupling?: Coupling,
): number {
  const { nx, fluid, fluidCount, res, zv, dir, adir, diag } = g;
  // r = b − (A + C) x0
  let rr = 0;
  for (let k = 0; k < fluidCount; k++) {
    const c = fluid[k];
    const ax = diag[c] * x[c] - x[c - 1] - x[c + 1] - x[c - nx] - x[c + nx];
    res[c] -= ax;
  }
  coupling?.apply(x, res, -1);
  for (let k = 0; k < fluidCount; k++) rr += res[fluid[k]] ** 2;
  const stop = tolerance * bNorm;
  let it = 0;
  if (Math.sqrt(rr) > stop) {
    pre.setup();
    pre.apply();
    let sigma = 0;
    for (let k = 0; k < fluidCount; k++) { const c = fluid[k]; dir[c] = zv[c]; sigma += zv[c] * res[c]; }
    for (it = 1; it <= maxIterations; it++) {
      // adir = A·dir;  α = σ / (dir·adir)
      let dAd = 0;
      for (let k = 0; k < fluidCount; k++) {
        const c = fluid[k];
        const a = diag[c] * dir[c] - dir[c - 1] - dir[c + 1] - dir[c - nx] - dir[c + nx];
        adir[c] = a;
        dAd += dir[c] * a;
      }
      if (coupling) dAd += coupling.apply(dir, adir, 1);
      if (!(dAd > 0)) break;
      const alpha = sigma / dAd;
      // x += α·dir;  r −= α·adir
      rr = 0;
      for (let k = 0; k < fluidCount; k++) {
        const c = fluid[k];
        x[c] += alpha * dir[c];
        const r = res[c] - alpha * adir[c];
        res[c] = r;
        rr += r * r;
      }
      if (Math.sqrt(rr) <= stop) break;
      pre.apply();
      // β = σ_new/σ;  dir = z + β·dir
      let sigmaNew = 0;
      for (let k = 0; k < fluidCount; k++) { const c = fluid[k]; sigmaNew += zv[c] * res[c]; }
      const beta = sigmaNew / sigma;
      sigma = sigmaNew;
      for (let k = 0; k < fluidCount; k++) { const c = fluid[k]; dir[c] = zv[c] + beta * dir[c]; }
    }
    if (it > maxIterations) it = maxIterations;
  }
  return it;
}

/**
 * u_f −= w_f·(q_right − q_left) on every face next to a fluid cell (q = 0 in air; w_f = 0 at solids, whose
 * faces keep the solid's velocity). Each face is visited once: a fluid cell updates its left and bottom
 * faces, and its right and top faces only when the neighbour there is not fluid.
 */
export function applyPressureGradient(g: ProjectionGrid): void {
  const { nx, gu: u, gv: v, faceU: wu, faceV: wv, type, fluid, fluidCount, q } = g;
  for (let k = 0; k < fluidCount; k++) {
    const c = fluid[k];
    const qc = q[c];
    u[c] -= wu[c] * (qc - q[c - 1]);
    v[c] -= wv[c] * (qc - q[c - nx]);
    if (type[c + 1] !== FLUID) u[c + 1] += wu[c + 1] * qc;
    if (type[c + nx] !== FLUID) v[c + nx] += wv[c + nx] * qc;
  }
}
