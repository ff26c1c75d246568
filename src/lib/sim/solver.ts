// The splash solver's public face: createSolver(scene) → a solver that advances the shot frame by frame
// (substeps chosen by the CFL condition) and exposes particles, the pressure field and per-frame stats.
import type { Scene } from '../scene/schema';
import { frameToTime } from '../scene/time';
import { shapeSignedDistance as shapeDistance } from '../scene/shapes';
import {
  FlipState, WATER_DENSITY, integrate, separate, placeSolids, collide, emit, particlesToGrid,
  densityAndDrift, driftSolve, gridToParticles, classifyCells, depositDensity, estimateRestDensity, type SolverOptions,
} from './stages';
import { projectGaussSeidel, projectPcgMic0, projectPcgMultigrid, FLUID } from './pressure';
import { liquidArea } from './area';
import { createRigidBodies, type PropState } from './rigid';
import { freeSurface } from './surface';
import { validateAfter } from './validate';
import { createViscousStep, sceneIsViscous } from './viscosity';
import { createDiffuse, foamScale, NO_DIFFUSE, type DiffuseView } from './diffuse';
import { defaultSolverTeam, type ThreadOptions } from './parallel';

export type { SolverOptions } from './stages';
export type { PropState } from './rigid';
export { WATER_DENSITY } from './stages';
export type { DiffuseView } from './diffuse';
export type { ThreadOptions } from './parallel';

/** Statistics of one shot frame. */
export interface FrameStats {
  /** Shot frame reached. */
  frame: number;
  /** Its time in seconds, (frame − startFrame)/fps. */
  time: number;
  count: number;
  /** Particles of each liquid, in the order of scene.liquids (they sum to count). */
  liquidCounts: number[];
  /** Every prop (keyed and free) at the frame's end: centroid (tank m), angle (deg), velocity (m/s), spin (deg/s). */
  props: PropState[];
  /**
   * Area inside the ρ/ρ₀ = ½ iso-contour of the cell-centred particle density, m² (marching squares; solids
   * excluded, see area.ts). Grows when the liquid spreads below rest density, shrinks when it is compressed.
   */
  liquidArea: number;
  /** Largest particle speed at the frame's end, m/s. */
  maxSpeed: number;
  /** Largest maxSpeed·dt/cellSize over the frame's substeps. */
  cfl: number;
  /** Largest relative pressure residual ‖b − A p‖₂/‖b‖₂ over the frame's substeps. */
  pressureResidual: number;
  /** Largest number of pressure iterations (sweeps or CG steps) of a substep. */
  pressureIterations: number;
  substeps: number;
  /** Wall time of the frame in milliseconds (not deterministic; everything else is). */
  stepMs: number;
  /** Wall time of each stage of the step over the frame's substeps, ms, by stage name (not deterministic). */
  stageMs: Record<string, number>;
}

/** One named stage of the substep (see createSolver's stage list). */
interface Stage {
  name: string;
  run(dt: number, f0: number, f1: number): void;
}

export interface PressureOptions {
  /** Write into this array (length nx·ny) instead of a new one (pressureField only). */
  out?: Float64Array;
}

export interface Grid {
  nx: number;
  ny: number;
  /** m */
  cellSize: number;
  /** Tank coordinates of the grid's lower-left corner (the border cell's corner), m. */
  originX: number;
  originY: number;
}

export interface Solver {
  readonly scene: Scene;
  /** Current shot frame (starts at timing.startFrame). */
  readonly frame: number;
  /** Current time, seconds since startFrame. */
  readonly time: number;
  readonly count: number;
  /** Particle positions (m) and velocities (m/s), views of length `count` valid until the next step. */
  readonly x: Float32Array;
  readonly y: Float32Array;
  readonly u: Float32Array;
  readonly v: Float32Array;
  /** Stable particle ids (order of the arrays changes between steps; ids follow particles). */
  readonly ids: Int32Array;
  /** Liquid of each particle: index into scene.liquids (same order as x/y/u/v). */
  readonly liquid: Uint8Array;
  /** Particle capacity allocated for this scene. */
  readonly capacity: number;
  readonly grid: Grid;
  /** Advances one shot frame; returns its statistics. */
  stepFrame(): FrameStats;
  /** Advances one substep of dt seconds (no frame bookkeeping beyond time); returns the relative pressure residual. */
  step(dt: number): number;
  /** Statistics of the current state without stepping (the initial frame: no substeps, stepMs 0). */
  stats(): FrameStats;
  /**
   * Pressure in Pa at cell centres from the last projection (length nx·ny; 0 outside liquid): the physical
   * pressure (the drift correction is a displacement of its own and never enters it, see stages.ts).
   */
  pressureField(options?: PressureOptions): Float64Array;
  /** Pressure in Pa at tank point (x, y): bilinear over cell centres of the last projection. */
  pressureAt(x: number, y: number): number;
  /** Signed distance (m) from (x, y) to the nearest wall or prop at the current pose (negative inside); Infinity if none. */
  solidDistance(x: number, y: number): number;
  /** Rest density ρ₀ in particles per cell (0 before liquid was first seen). */
  readonly restDensity: number;
  /** Particles that could not be emitted because the capacity was reached. */
  readonly emissionDropped: number;
  /** Foam and spray (diffuse.ts) at the current time; empty when the scene's look.foam is 0. */
  readonly diffuse: DiffuseView;
}

/** Creates a solver for a parsed scene (see parseScene); the state is allocated here, once. */
export function createSolver(scene: Scene, options: SolverOptions & ThreadOptions = {}): Solver {
  const S = new FlipState(scene, options);
  // several threads (parallel.ts): the state moves to shared memory before anything else holds its arrays
  const team = options.team === undefined ? defaultSolverTeam() : options.team;
  const par = team && team.threads > 1 ? team.attach(S) : null;
  const validating = options.validate ?? (typeof process !== 'undefined' && process.env?.TIDEMARK_VALIDATE === '1');
  const { timing, physics } = scene;
  const frameDt = 1 / timing.fps;
  const solverName = physics.pressureSolver;
  let frame = timing.startFrame;
  let time = 0;
  let lastResidual = 0;
  const speedOfSpouts = scene.spouts.reduce((m, s) => Math.max(m, Math.hypot(s.velocity[0], s.velocity[1])), 0);
  const gMag = Math.hypot(physics.gravity[0], physics.gravity[1]);

  // The first frame: solids at their starting pose, cell types and the density of the seeded pours, so that
  // stats() can measure it. Every array written here is rewritten by a step before the step reads it.
  if (S.props.length > 0) placeSolids(S, timing.startFrame, timing.startFrame, frameDt);
  classifyCells(S);
  depositDensity(S);
  const rigid = createRigidBodies(S, scene);
  const hasFree = scene.props.some((p) => p.motion === 'free');
  // implicit viscosity (viscosity.ts): only for scenes where some liquid's ν·dt/h² is not negligible
  const viscous = sceneIsViscous(scene) ? createViscousStep(S, scene) : null;
  // foam and spray (diffuse.ts): read-only, right after the hash sorted the particles; off at look.foam 0
  const diffuse = foamScale(scene) > 0 ? createDiffuse(S, scene) : null;

  function project(dt: number): number {
    // warm start for CG: q scales with dt (q = p·dt/(ρh))
    if (S.lastDt > 0 && S.lastDt !== dt) { const k = dt / S.lastDt; for (let c = 0; c < S.nc; c++) S.q[c] *= k; }
    S.lastDt = dt;
    // free props are coupled into the matrix (rigid.ts), which only the CG solvers take (MIC(0) for gauss-seidel)
    const cg = solverName === 'pcg-multigrid' ? projectPcgMultigrid : projectPcgMic0;
    if (hasFree) { rigid.prepareCoupling(); return cg(S, physics.pressureIterations, physics.pressureTolerance, rigid.coupling); }
    return solverName === 'gauss-seidel'
      ? projectGaussSeidel(S, physics.pressureIterations, physics.overRelaxation, physics.pressureTolerance)
      : cg(S, physics.pressureIterations, physics.pressureTolerance);
  }

  /**
   * One substep is this list, run in order. Each stage reads the substep's time step dt and the shot
   * frames f0 → f1 it spans; its wall time adds to the frame's stageMs under its name. Stages that do
   * nothing for a scene (free props, solids that never move) are left out of its list.
   */
  const stages: Stage[] = [
    ...(hasFree ? [{ name: 'free props', run: (dt: number, f0: number) => rigid.advance(dt, f0) }] : []),
    { name: 'solids', run: (dt, f0, f1) => placeSolids(S, f0, f1, dt) },
    { name: 'gravity and advection', run: par ? (dt) => par.integrate(dt) : (dt) => integrate(S, dt) },
    { name: 'spatial hash', run: () => S.sortByHashCell() },
    ...(diffuse ? [{ name: 'foam and spray', run: (dt: number, f0: number, f1: number) => diffuse.run(dt, f0, f1) }] : []),
    { name: 'separation', run: par ? () => par.separate(physics.separationIterations) : () => separate(S, physics.separationIterations) },
    { name: 'collision', run: () => collide(S) },
    { name: 'emission', run: (_dt, f0) => emit(S, f0) },
    { name: 'particles to grid', run: par ? () => par.particlesToGrid() : () => particlesToGrid(S) },
    { name: 'density and drift', run: (dt) => densityAndDrift(S, dt) },
    { name: 'free surface', run: () => freeSurface(S) },
    // after the transfer to the grid (and the densities its liquid fractions read), before the projection
    ...(viscous ? [{ name: 'viscosity', run: (dt: number) => { viscous.run(dt); if (hasFree) rigid.viscousDrag(viscous.reactionU, viscous.reactionV); } }] : []),
    { name: 'pressure', run: (dt) => { lastResidual = project(dt); } },
    ...(hasFree ? [{ name: 'prop contacts', run: () => rigid.settle() }] : []),
    { name: 'drift correction', run: () => driftSolve(S, physics.pressureIterations, physics.pressureTolerance) },
    { name: 'grid to particles', run: par ? (dt) => par.gridToParticles(dt) : (dt) => gridToParticles(S, dt) },
  ];
  const stageMs = new Float64Array(stages.length);

  function step(dt: number): number {
    const f0 = timing.startFrame + time * timing.fps, f1 = timing.startFrame + (time + dt) * timing.fps;
    for (let k = 0; k < stages.length; k++) {
      const t0 = performance.now();
      stages[k].run(dt, f0, f1);
      stageMs[k] += performance.now() - t0;
      if (validating) validateAfter(S, stages[k].name, physics, lastResidual);
    }
    time += dt;
    return lastResidual;
  }

  function takeStageMs(): Record<string, number> {
    const out: Record<string, number> = {};
    for (let k = 0; k < stages.length; k++) { out[stages[k].name] = stageMs[k]; stageMs[k] = 0; }
    return out;
  }

  function propSpeed(): number {
    let m = 0;
    for (const p of S.props) m = Math.max(m, Math.hypot(p.vx, p.vy) + Math.abs(p.omega) * p.reach);
    return m;
  }

  function stepFrame(): FrameStats {
    const t0 = performance.now();
    const tEnd = frameToTime(timing, frame + 1);
    const minDt = frameDt / timing.substeps;
    let substeps = 0, cfl = 0, res = 0, iters = 0;
    while (time < tEnd - 1e-9 * frameDt) {
      const remaining = tEnd - time;
      // CFL: (max speed)·dt/h ≤ cfl, with the speed bounded by particles, spouts, props and one step of gravity
      const speed = Math.max(S.maxSpeed, speedOfSpouts, propSpeed()) + gMag * minDt;
      let dtMax = minDt;
      if (speed * dtMax > physics.cfl * S.h) dtMax = (physics.cfl * S.h) / speed;
      const k = Math.max(1, Math.ceil(remaining / dtMax - 1e-9));
      const dt = remaining / k;
      const r = step(dt);
      substeps++;
      if (r > res) res = r;
      if (S.lastIterations > iters) iters = S.lastIterations;
      const c = (S.maxSpeed * dt) / S.h;
      if (c > cfl) cfl = c;
    }
    frame++;
    time = tEnd;
    return {
      frame, time, count: S.n, liquidCounts: S.liquidCounts(), props: rigid.states(), liquidArea: liquidArea(S), maxSpeed: S.maxSpeed, cfl,
      pressureResidual: res, pressureIterations: iters, substeps, stepMs: performance.now() - t0, stageMs: takeStageMs(),
    };
  }

  function stats(): FrameStats {
    let max2 = 0;
    for (let p = 0; p < S.n; p++) { const s2 = S.u[p] * S.u[p] + S.v[p] * S.v[p]; if (s2 > max2) max2 = s2; }
    // S.dens always holds the density of the current positions (construction, or the last step's stage 6).
    // Before the first step ρ₀ is not fixed yet: the seeded density stands in for it (not stored, so
    // calling stats() never changes a bake).
    const rest = S.restDensity > 0 ? S.restDensity : estimateRestDensity(S);
    return {
      frame, time, count: S.n, liquidCounts: S.liquidCounts(), props: rigid.states(), liquidArea: liquidArea(S, rest), maxSpeed: Math.sqrt(max2), cfl: 0,
      pressureResidual: 0, pressureIterations: 0, substeps: 0, stepMs: 0, stageMs: {},
    };
  }

  function pressureField(options: PressureOptions = {}): Float64Array {
    const out = options.out ?? new Float64Array(S.nc);
    const q = S.q;
    // p = q·ρ·h/dt (Pa)
    const k = S.lastDt > 0 ? (WATER_DENSITY * S.h) / S.lastDt : 0;
    for (let c = 0; c < S.nc; c++) out[c] = S.type[c] === FLUID ? q[c] * k : 0;
    return out;
  }

  function pressureAt(x: number, y: number): number {
    const qs = S.q;
    const k = S.lastDt > 0 ? (WATER_DENSITY * S.h) / S.lastDt : 0;
    let fx = x / S.h + 0.5, fy = y / S.h + 0.5; // centre of cell i at x = (i − ½)h
    fx = Math.min(Math.max(fx, 0), S.nx - 1.0001); fy = Math.min(Math.max(fy, 0), S.ny - 1.0001);
    const i = Math.floor(fx), j = Math.floor(fy), tx = fx - i, ty = fy - j, c = i + S.nx * j;
    const q = (cc: number) => (S.type[cc] === FLUID ? qs[cc] : 0);
    return k * ((1 - tx) * (1 - ty) * q(c) + tx * (1 - ty) * q(c + 1) + tx * ty * q(c + S.nx + 1) + (1 - tx) * ty * q(c + S.nx));
  }

  function solidDistance(x: number, y: number): number {
    let d = Infinity;
    const n = S.normal;
    for (const w of scene.walls) d = Math.min(d, shapeDistance(w.shape, x, y, n));
    for (const p of S.props) d = Math.min(d, S.propDistance(p, x, y));
    return d;
  }

  return {
    scene,
    get frame() { return frame; },
    get time() { return time; },
    get count() { return S.n; },
    get x() { return S.x.subarray(0, S.n); },
    get y() { return S.y.subarray(0, S.n); },
    get u() { return S.u.subarray(0, S.n); },
    get v() { return S.v.subarray(0, S.n); },
    get ids() { return S.ids.subarray(0, S.n); },
    get liquid() { return S.liquid.subarray(0, S.n); },
    get capacity() { return S.cap; },
    grid: { nx: S.nx, ny: S.ny, cellSize: S.h, originX: -S.h, originY: -S.h },
    stepFrame, step, stats, pressureField, pressureAt, solidDistance,
    get restDensity() { return S.restDensity; },
    get emissionDropped() { return S.emissionDropped; },
    get diffuse() { return diffuse ? diffuse.view : NO_DIFFUSE; },
  };
}

