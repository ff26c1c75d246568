// The parameters panel's fields: what each solver setting means, its unit and range (the schema's limits), and the
// physics presets — our own settings that suit a kind of splash (a "look" is a render look, not physics).
import type { EditorDoc } from './document';

export interface ParamSpec {
  /** Path in the document, e.g. 'physics.flipRatio' or 'tank.cellSize'. */
  path: string;
  label: string;
  unit: string;
  min: number;
  max: number;
  step: number;
  /** One line: what it does to the splash. */
  help: string;
  /** Whole numbers only. */
  integer?: boolean;
  /** Allowed values only (particles per cell). */
  choices?: readonly number[];
  /** Solver internals for FX TDs: shown under the "Advanced" fold. */
  advanced?: boolean;
}

export const PARAMS: readonly ParamSpec[] = [
  { path: 'physics.gravity.1', label: 'Gravity (down)', unit: 'm/s²', min: -50, max: 0, step: 0.01, help: 'Vertical pull on the liquid; −9.81 is Earth. Smaller magnitudes read as slow motion or a larger scale.' },
  { path: 'physics.gravity.0', label: 'Gravity (sideways)', unit: 'm/s²', min: -50, max: 50, step: 0.01, help: 'Sideways pull, e.g. to fake a tilted or accelerating tank. Usually 0.' },
  { path: 'tank.cellSize', label: 'Cell size', unit: 'm', min: 0.001, max: 1, step: 0.0005, help: 'Grid spacing of the bake. Smaller shows finer droplets but costs about the cube of the refinement.' },
  { path: 'physics.particlesPerCell', label: 'Particles per cell', unit: '', min: 1, max: 16, step: 1, integer: true, choices: [1, 4, 9, 16], help: 'Seeding density: 4 is a 2 × 2 sub-grid per cell. More gives smoother surfaces and slower bakes.' },
  { path: 'physics.flipRatio', label: 'FLIP / PIC blend', unit: '', min: 0, max: 1, step: 0.01, help: '1 keeps every swirl (lively, noisy); 0 smooths each step (calm, syrupy). 0.9–0.97 reads as water.' },
  { path: 'physics.pressureTolerance', label: 'Pressure tolerance', unit: 'relative', min: 0.0001, max: 0.5, step: 0.0001, help: 'How far the pressure solve must shrink its residual. Smaller keeps volume better and costs time.', advanced: true },
  { path: 'physics.pressureIterations', label: 'Pressure iterations (cap)', unit: '', min: 1, max: 10000, step: 1, integer: true, help: 'Most iterations a step may use to reach the tolerance.', advanced: true },
  { path: 'physics.overRelaxation', label: 'Over-relaxation', unit: '', min: 0.1, max: 1.99, step: 0.01, help: 'Gauss–Seidel only: step size of each sweep; 1.9 converges fastest on most tanks.', advanced: true },
  { path: 'physics.driftCorrection', label: 'Drift correction', unit: '', min: 0, max: 2, step: 0.1, help: 'Pushes crowded particles apart so the liquid keeps its volume over long shots. 0 turns it off.' },
  { path: 'physics.separationIterations', label: 'Separation passes', unit: '', min: 0, max: 20, step: 1, integer: true, help: 'Passes that keep particles from clumping. 2 is usually enough.', advanced: true },
  { path: 'physics.particleRadius', label: 'Particle radius', unit: '× cell', min: 0.05, max: 0.5, step: 0.01, help: 'Particle size as a fraction of the cell, used when separating particles.', advanced: true },
  { path: 'timing.substeps', label: 'Substeps per frame (min)', unit: '', min: 1, max: 200, step: 1, integer: true, help: 'Fewest solver steps per frame; more are added when the liquid moves fast (see CFL).' },
  { path: 'physics.cfl', label: 'CFL limit', unit: 'cells/step', min: 0.1, max: 10, step: 0.1, help: 'Farthest a particle may travel in one step. Lower is steadier for fast impacts and slower to bake.', advanced: true },
  { path: 'physics.seed', label: 'Seed', unit: '', min: 0, max: 4294967295, step: 1, integer: true, help: 'Drives the particle jitter at seeding. Same seed, same splash; change it for a variation.' },
];

/** Reads a number at a dotted path ('physics.gravity.1'). */
export function readPath(doc: EditorDoc, path: string): unknown {
  return path.split('.').reduce<unknown>((o, k) => (o == null ? undefined : (o as Record<string, unknown>)[k]), doc);
}

/** Returns a copy of the section at the path's first segment with the value set (for a setSection command). */
export function sectionWith<S extends 'tank' | 'timing' | 'physics'>(doc: EditorDoc, path: string, value: unknown): { section: S; value: EditorDoc[S] } {
  const [section, ...rest] = path.split('.') as [S, ...string[]];
  const copy = structuredClone(doc[section]) as Record<string, unknown>;
  let o: Record<string, unknown> = copy;
  for (let k = 0; k < rest.length - 1; k++) o = o[rest[k]] as Record<string, unknown>;
  o[rest[rest.length - 1]] = value;
  return { section, value: copy as EditorDoc[S] };
}

export interface PhysicsPreset {
  id: string;
  label: string;
  /** One line on what it is for. */
  blurb: string;
  physics: Partial<EditorDoc['physics']>;
  substeps: number;
}

/** Our physics presets. Values are common practice for FLIP liquids at previs resolution (no source). */
export const PHYSICS_PRESETS: readonly PhysicsPreset[] = [
  {
    id: 'drip', label: 'Drip', blurb: 'Small, slow drops and trickles: calm transfer, tight volume.',
    physics: { flipRatio: 0.85, driftCorrection: 1, separationIterations: 2, cfl: 1, pressureTolerance: 5e-3, pressureIterations: 80, particlesPerCell: 4 },
    substeps: 3,
  },
  {
    id: 'pour', label: 'Steady pour', blurb: 'A stream filling a vessel: lively surface, moderate speeds.',
    physics: { flipRatio: 0.93, driftCorrection: 1, separationIterations: 2, cfl: 1.5, pressureTolerance: 1e-2, pressureIterations: 60, particlesPerCell: 4 },
    substeps: 4,
  },
  {
    id: 'crash', label: 'Crash', blurb: 'A heavy prop or wave hitting liquid: fast sheets and spray, more steps per frame.',
    physics: { flipRatio: 0.97, driftCorrection: 1.5, separationIterations: 3, cfl: 0.8, pressureTolerance: 1e-2, pressureIterations: 100, particlesPerCell: 4 },
    substeps: 6,
  },
];

/** The document with a preset's physics and substeps applied (everything else unchanged). */
export function applyPreset(doc: EditorDoc, preset: PhysicsPreset): EditorDoc {
  return { ...doc, physics: { ...doc.physics, ...preset.physics }, timing: { ...doc.timing, substeps: preset.substeps } };
}
