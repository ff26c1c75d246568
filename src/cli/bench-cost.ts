// Work units per second of the solver, to set DEFAULT_BAKE_COST_LIMIT (src/lib/scene/cost.ts): bakes the
// reference dam break for a few frames and divides the estimated work by the wall time. Prints figures and a JSON line.
import { bakeCost, DEFAULT_BAKE_COST_LIMIT } from '../lib/scene/cost';
import { createSolver, referenceDamBreak } from '../lib/sim';

const frames = Number(process.argv[2] ?? 24);
const { scene, options } = referenceDamBreak(1, undefined, undefined, frames);
const sim = createSolver(scene, options);
sim.stepFrame(); // warm-up frame (JIT), not counted
const t0 = performance.now();
for (let f = 1; f < frames; f++) sim.stepFrame();
const seconds = (performance.now() - t0) / 1000;
const cost = bakeCost(scene);
const perSecond = (cost.total * (frames - 1)) / frames / seconds;
const hoursAtLimit = DEFAULT_BAKE_COST_LIMIT / perSecond / 3600;
console.log(`reference dam break: ${cost.cells} cells, ~${Math.round(cost.particleCount)} particles, ${frames - 1} frames in ${seconds.toFixed(2)} s`);
console.log(`work units/s: ${perSecond.toExponential(2)}; default limit ${DEFAULT_BAKE_COST_LIMIT.toExponential(2)} ≈ ${hoursAtLimit.toFixed(2)} h here`);
console.log(JSON.stringify({ workUnitsPerSecond: perSecond, hoursAtDefaultLimit: hoursAtLimit }));
