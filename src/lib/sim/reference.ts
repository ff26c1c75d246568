// The reference dam break used to measure the solver against a native implementation of the textbook
// step: a square tank (1 m at scale 1, including its one-cell solid border), cell 1/128 m, a water block
// x ∈ [h, 0.5·s], y ∈ [h, 0.8·s] (border-inclusive coordinates) at 2 × 2 particles per cell, regular layout,
// g = −9.81 m/s², dt = 1/120 s, 2 separation iterations, particle radius 0.3·h.
import { parseScene, type Scene, type PressureSolverName } from '../scene/schema';
import type { SolverOptions } from './solver';

export interface DamBreakSetup {
  scene: Scene;
  options: SolverOptions;
  /** Steps to run (one per frame: fps = 120, substeps = 1, CFL limit lifted). */
  steps: number;
  /** Add to tank x to get the border-inclusive x of the native reference (m). */
  offset: number;
  /** Initial water column height H (m), for Ritter's front speed 2·√(g·H). */
  columnHeight: number;
}

/** Builds the reference dam break at `scale` (1 → 1 m tank, 2 → 2 m tank at the same cell size). */
export function referenceDamBreak(scale = 1, pressureSolver?: PressureSolverName, pressureTolerance?: number, steps = 240): DamBreakSetup {
  const h = 1 / 128;
  const cellsWithBorder = 128 * scale;
  const inner = (cellsWithBorder - 2) * h;
  // particle rows and columns as the native code counts them: whole half-cells between h and the block's edge
  const cols = Math.floor((0.5 * scale - h) / (0.5 * h));
  const rows = Math.floor((0.8 * scale - h) / (0.5 * h));
  const doc = {
    version: 1,
    tank: { width: inner, height: inner, cellSize: h, sides: { left: true, right: true, bottom: true, top: true } },
    timing: { fps: 120, startFrame: 0, endFrame: steps - 1, substeps: 1 },
    physics: {
      gravity: [0, -9.81], flipRatio: 0.9, pressureIterations: 50, overRelaxation: 1.9, separationIterations: 2,
      driftCorrection: 1.0, particlesPerCell: 4, particleRadius: 0.3, cfl: 10, seed: 1,
      ...(pressureSolver ? { pressureSolver } : {}), ...(pressureTolerance ? { pressureTolerance } : {}),
    },
    pours: [{ id: 'column', shape: { type: 'rect', x: 0, y: 0, width: cols * 0.5 * h, height: rows * 0.5 * h } }],
  };
  const r = parseScene(doc);
  if (!r.ok) throw new Error('reference dam break scene is invalid: ' + JSON.stringify(r.errors));
  return { scene: r.scene, options: { seedingJitter: 0 }, steps, offset: h, columnHeight: rows * 0.5 * h };
}
