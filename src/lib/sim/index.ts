// The FLIP splash solver: pure TypeScript, runs in a Web Worker and in Node worker_threads.
export { createSolver, WATER_DENSITY, type Solver, type FrameStats, type Grid, type SolverOptions, type PressureOptions } from './solver';
export { liquidArea, squareIsoArea } from './area';
export { bakeFrames, bakeChecksum, framesChecksum, packFrame } from './bake';
export { mulberry32 } from './prng';
export { referenceDamBreak, type DamBreakSetup } from './reference';
