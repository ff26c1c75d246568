// One cost estimate for a whole bake, so that no single field (frames, cell size, substeps, pressure
// iterations) can make a scene that runs for days even though each is inside its own limit.
// Work units: one unit is one grid cell visited by one pressure iteration in one substep, or one particle
// moved in one substep. The estimate is an upper bound on configured work (CFL may add substeps; a
// tolerance may stop the pressure solve early), not a prediction of wall time.
import { estimateParticles, tankCells, type Scene } from './schema';

/** The scene fields the estimate depends on, in the dotted form error responses use. */
export const COST_FIELDS = ['timing.endFrame', 'tank.cellSize', 'timing.substeps', 'physics.pressureIterations'] as const;
export type CostField = (typeof COST_FIELDS)[number];

/**
 * Default limit in work units, about two hours of baking on the development machine. Measured with
 * `npx tsx src/cli/bench-cost.ts 24` and `… 48` (2 cores shared with other jobs, Node 20.20) on 2026-12-03: the
 * reference dam break (src/lib/sim/reference.ts: 126 × 126 cells, 50 pressure iterations, ≈ 25 500 particles,
 * 1 substep, pcg-mic0 at its default tolerance) ran 23 frames in 1.54 s = 1.22·10⁷ work units/s and 47 frames
 * in 2.48 s = 1.55·10⁷ work units/s. Taking 1.4·10⁷ units/s: 1.4·10⁷ × 7200 s ≈ 1.0·10¹¹.
 * (The CG solve usually stops before 50 iterations, so the estimate overstates real work and the limit errs
 * on the side of refusing.) Studios can set their own in studios.bake_cost_limit.
 */
export const DEFAULT_BAKE_COST_LIMIT = 1.0e11;
/** The measured rate behind DEFAULT_BAKE_COST_LIMIT, work units per second (see above). */
export const MEASURED_WORK_UNITS_PER_SECOND = 1.4e7;

/**
 * Nominal values each field is compared with to name the one that dominates: the default shot length
 * (48 frames), the default substeps (5), the default pressure iterations (50) and a 128 × 128 grid.
 * Common practice (no source): these are the defaults a new scene gets in this product.
 */
const NOMINAL = { frames: 48, substeps: 5, pressureIterations: 50, cells: 128 * 128 } as const;

export interface BakeCost {
  /** Total estimated work units for the bake. */
  total: number;
  /** Pressure part: cells × frames × substeps × pressure iterations. */
  pressure: number;
  /** Particle part: particles × frames × substeps. */
  particles: number;
  frames: number;
  cells: number;
  particleCount: number;
  /** The field whose value is furthest above its nominal value (what to change first). */
  dominant: CostField;
}

/** Estimated work of baking `scene` (a parsed scene, defaults filled in). */
export function bakeCost(scene: Scene): BakeCost {
  const { nx, ny } = tankCells(scene.tank);
  const cells = nx * ny;
  const frames = Math.max(0, scene.timing.endFrame - scene.timing.startFrame + 1);
  const substeps = scene.timing.substeps;
  const iters = scene.physics.pressureIterations;
  // pours' area × particlesPerCell / cellSize² plus every spout's emission (spoutEmissionEstimate)
  const particleCount = estimateParticles(scene);
  const pressure = cells * frames * substeps * iters;
  const particles = particleCount * frames * substeps;
  const factors: [CostField, number][] = [
    ['timing.endFrame', frames / NOMINAL.frames],
    ['tank.cellSize', cells / NOMINAL.cells],
    ['timing.substeps', substeps / NOMINAL.substeps],
    // pressure iterations only scale the pressure part; weigh them by that part's share of the total
    ['physics.pressureIterations', (iters / NOMINAL.pressureIterations) * (pressure / Math.max(1, pressure + particles))],
  ];
  let dominant = factors[0];
  for (const f of factors) if (f[1] > dominant[1]) dominant = f;
  return { total: pressure + particles, pressure, particles, frames, cells, particleCount, dominant: dominant[0] };
}

/** "4.2 × 10¹¹" style, for messages. */
function sci(n: number): string {
  if (!Number.isFinite(n)) return String(n);
  if (n < 1e6) return Math.round(n).toLocaleString('en-US');
  const e = Math.floor(Math.log10(n));
  const sup = String(e).replace(/\d/g, (d) => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(d)]);
  return `${(n / 10 ** e).toFixed(1)} × 10${sup}`;
}

/** Rough baking time of `units` work units on the measured machine, in words. */
function duration(units: number): string {
  const s = units / MEASURED_WORK_UNITS_PER_SECOND;
  if (s < 120) return `${Math.round(s)} seconds`;
  if (s < 2 * 3600) return `${Math.round(s / 60)} minutes`;
  if (s < 2 * 86400) return `${Math.round(s / 3600)} hours`;
  return `${Math.round(s / 86400).toLocaleString('en-US')} days`;
}

export interface BakeCostError {
  field: CostField;
  message: string;
}

/**
 * Null when the bake fits `limit` work units (default DEFAULT_BAKE_COST_LIMIT), otherwise the field to change
 * and a message that names the estimate and the limit.
 */
export function checkBakeCost(scene: Scene, limit: number = DEFAULT_BAKE_COST_LIMIT): BakeCostError | null {
  const c = bakeCost(scene);
  if (c.total <= limit) return null;
  return {
    field: c.dominant,
    message:
      `this bake needs about ${sci(c.total)} work units (about ${duration(c.total)} here); the limit is ${sci(limit)} ` +
      `(about ${duration(limit)}). Change ${c.dominant} first (${c.frames.toLocaleString('en-US')} frames, ` +
      `${c.cells.toLocaleString('en-US')} cells, ${scene.timing.substeps} substeps, ${scene.physics.pressureIterations} pressure iterations)`,
  };
}
