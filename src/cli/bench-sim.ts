// Solver benchmark, one thread: runs the reference dam break through our solver and prints particles, steps,
// wall/cpu seconds, particle-steps per second, pressure residuals (ours vs 50 Gauss–Seidel sweeps inside our
// solver), the dam-break front and the milliseconds of each stage; with --ref also runs the native measuring
// stick (../shared/bench/flip-ref/run.sh) right after ours in the same run and prints ours ÷ native (wall and CPU).
// The headline ratio is the liquid step the native code also computes: foam and spray off (look.foam 0; a
// read-only look stage, diffuse.ts, that the textbook step does not have); the same run with the scene's
// default foam follows, with its own ratio. Then the cost per particle-step of the same scene at 25k, 100k and
// 400k particles (tank 1, 2 and 4 m at the same cell size, the first --scale-steps steps of each), the same
// scene with one free prop (cost ratio to a keyed one) and with ν = 1e-2 m²/s (cost ratio to water).
// Usage: npx tsx src/cli/bench-sim.ts [--ref] [--rounds N] [--scales 1,2,4] [--scale-steps 60]
//        [--solver pcg-mic0|pcg-multigrid|gauss-seidel] [--props-only | --viscous-only]
// Then the dam break on 1, 2 and N threads (bench-threads.ts; --threads 1,2,4 to choose, --threads-only for that alone).
// Also runs the dam break with the other CG preconditioner (multigrid vs MIC(0)) at the default tolerance, and the
// pressure-solver section (bench-pressure.ts: iterations and ms per solve at 64², 128², 256²).
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { createSolver } from '../lib/sim/solver';
import { referenceDamBreak } from '../lib/sim/reference';
import { benchPressure } from './bench-pressure';
import { benchThreads, threadCounts } from './bench-threads';
import { DEFAULT_PRESSURE_SOLVER, DEFAULT_PRESSURE_TOLERANCE, parseScene, type PressureSolverName } from '../lib/scene/schema';

interface RunFigures {
  label: string; scale: number; solver: PressureSolverName; tolerance: number;
  particles: number; steps: number; wall_s: number; cpu_s: number; psteps_per_s: number;
  residual_median: number; residual_max: number; iterations_mean: number;
  front: Record<string, number>;
  /** Wall time per solver stage summed over the run, ms (FrameStats.stageMs). */
  stage_ms: Record<string, number>;
}

function arg(name: string): string | undefined {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

function median(a: number[]): number {
  const s = [...a].sort((p, q) => p - q);
  return s.length ? s[Math.floor(s.length / 2)] : 0;
}

/** The reference dam break with look.foam set (0 = foam and spray off). */
function damBreak(scale: number, solver: PressureSolverName | undefined, tolerance: number | undefined, foam: number, steps = 240) {
  const setup = referenceDamBreak(scale, solver, tolerance, steps);
  const r = parseScene({ ...setup.scene, look: { foam } });
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return { ...setup, scene: r.scene };
}

/** Runs one dam break; `tolerance` tiny makes Gauss–Seidel always do all 50 sweeps. */
function runDamBreak(label: string, scale: number, solver: PressureSolverName, tolerance: number, foam = 0, steps = 240): RunFigures {
  const setup = damBreak(scale, solver, tolerance, foam, steps);
  const sim = createSolver(setup.scene, setup.options);
  const dt = 1 / setup.scene.timing.fps;
  const frontSteps = new Map([0.1, 0.2, 0.25, 0.5].map((t) => [Math.round(t / dt), t]));
  const front: Record<string, number> = {};
  const residuals: number[] = [];
  let iterations = 0;
  const stageMs: Record<string, number> = {};
  const particles = sim.count;
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  for (let s = 1; s <= setup.steps; s++) {
    const st = sim.stepFrame();
    residuals.push(st.pressureResidual);
    iterations += st.pressureIterations;
    for (const [name, ms] of Object.entries(st.stageMs)) stageMs[name] = (stageMs[name] ?? 0) + ms;
    const t = frontSteps.get(s);
    if (t !== undefined) {
      let m = -Infinity;
      const x = sim.x;
      for (let i = 0; i < x.length; i++) if (x[i] > m) m = x[i];
      front[t.toFixed(2)] = m + setup.offset; // border-inclusive x, as the native code reports it
    }
  }
  const wall = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(c0);
  return {
    label, scale, solver, tolerance, particles, steps: setup.steps, wall_s: wall, cpu_s: (cpu.user + cpu.system) / 1e6,
    psteps_per_s: (particles * setup.steps) / wall, residual_median: median(residuals), residual_max: Math.max(...residuals),
    iterations_mean: iterations / setup.steps, front, stage_ms: stageMs,
  };
}

function printRun(r: RunFigures): void {
  const f = Object.entries(r.front).map(([t, x]) => `front_${t}s=${x.toFixed(4)}`).join(' ');
  console.log(
    `${r.label.padEnd(22)} scale=${r.scale} solver=${r.solver} tol=${r.tolerance.toExponential(1)} particles=${r.particles} steps=${r.steps} ` +
      `wall_s=${r.wall_s.toFixed(3)} cpu_s=${r.cpu_s.toFixed(3)} psteps_per_s=${r.psteps_per_s.toExponential(3)} ` +
      `residual_median=${r.residual_median.toExponential(2)} residual_max=${r.residual_max.toExponential(2)} iters_mean=${r.iterations_mean.toFixed(1)} ${f}`,
  );
  const total = Object.values(r.stage_ms).reduce((a, b) => a + b, 0);
  const shares = Object.entries(r.stage_ms).map(([name, ms]) => `${name} ${ms.toFixed(0)} ms (${((100 * ms) / total).toFixed(0)}%)`).join(', ');
  console.log(`${''.padEnd(22)} stages: ${shares}`);
}

interface NativeFigures { psteps_per_s: number; wall_s: number; cpu_s: number; particles: number; line: string }

function runNative(): NativeFigures | null {
  const candidates = [resolve(process.cwd(), '../shared/bench/flip-ref/run.sh'), '/work/shared/bench/flip-ref/run.sh'];
  const script = candidates.find((p) => existsSync(p));
  if (!script) { console.log('native: run.sh not found'); return null; }
  const out = execFileSync('bash', [script, '1'], { encoding: 'utf8' });
  const line = out.trim().split('\n').filter((l) => l.includes('psteps_per_s='))[0] ?? '';
  const num = (k: string) => Number((line.match(new RegExp(`${k}=([0-9.eE+-]+)`)) ?? [])[1]);
  return { psteps_per_s: num('psteps_per_s'), wall_s: num('wall_s'), cpu_s: num('cpu_s'), particles: num('particles'), line };
}

/**
 * The reference dam break with one prop dropped into the column, keyed (held still) and free (500 kg/m³):
 * the free prop's cost (rigid step, pressure integration, contacts) as a ratio of CPU time to the keyed one.
 */
function runPropCost(): { keyed_cpu_s: number; free_cpu_s: number; ratio: number } {
  const base = damBreak(1, undefined, undefined, 0);
  const shape = { type: 'rect' as const, x: 0.2, y: 0.85, width: 0.1, height: 0.1 };
  const cpuOf = (prop: Record<string, unknown>): number => {
    const r = parseScene({ ...base.scene, props: [prop] });
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    const sim = createSolver(r.scene, base.options);
    const c0 = process.cpuUsage();
    for (let s = 1; s <= base.steps; s++) sim.stepFrame();
    const c = process.cpuUsage(c0);
    return (c.user + c.system) / 1e6;
  };
  const keyed = cpuOf({ id: 'can', shape, keys: [{ frame: 0, dx: 0, dy: 0, angle: 0 }] });
  const free = cpuOf({ id: 'can', shape, motion: 'free', density: 500 });
  const ratio = free / keyed;
  console.log(`one prop in the reference dam break: keyed cpu_s=${keyed.toFixed(3)} free cpu_s=${free.toFixed(3)} ratio free/keyed=${ratio.toFixed(3)} (target ≤ 1.3)`);
  return { keyed_cpu_s: +keyed.toFixed(4), free_cpu_s: +free.toFixed(4), ratio: +ratio.toFixed(4) };
}

/**
 * The reference dam break as water (1e-6 m²/s: the viscous stage is left out) and as a liquid of ν = 1e-2 m²/s
 * (thick paint; implicit viscosity, viscosity.ts): CPU time ratio viscous/water (target ≤ 1.5), the viscous
 * stage's share of the viscous run, and the dam-break front of each at 0.1 s.
 */
function runViscousCost(): { water_cpu_s: number; viscous_cpu_s: number; ratio: number; viscosity_share: number; front_water: number; front_viscous: number } {
  const base = damBreak(1, undefined, undefined, 0);
  const run = (viscosity: number, steps = base.steps) => {
    const r = parseScene({ ...base.scene, version: 2, liquids: [{ id: 'water', name: 'Test liquid', colour: '#3A8FB7', viscosity }] });
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    const sim = createSolver(r.scene, base.options);
    let stage = 0, total = 0, front = 0;
    const c0 = process.cpuUsage();
    for (let s = 1; s <= steps; s++) {
      const st = sim.stepFrame();
      for (const [name, ms] of Object.entries(st.stageMs)) { total += ms; if (name === 'viscosity') stage += ms; }
      if (s === 12) { const x = sim.x; front = -Infinity; for (let i = 0; i < x.length; i++) if (x[i] > front) front = x[i]; }
    }
    const c = process.cpuUsage(c0);
    return { cpu: (c.user + c.system) / 1e6, share: total > 0 ? stage / total : 0, front };
  };
  // warm both up first, so that neither run pays the JIT's compile time for the other
  run(1e-6, 24); run(1e-2, 24);
  const water = run(1e-6), viscous = run(1e-2);
  const ratio = viscous.cpu / water.cpu;
  console.log(
    `reference dam break, ν = 1e-2 m²/s vs water: water cpu_s=${water.cpu.toFixed(3)} viscous cpu_s=${viscous.cpu.toFixed(3)} ` +
      `ratio viscous/water=${ratio.toFixed(3)} (target ≤ 1.5); viscosity stage ${(100 * viscous.share).toFixed(0)}% of the viscous step; ` +
      `front at 0.1 s: water ${water.front.toFixed(3)} m, viscous ${viscous.front.toFixed(3)} m`,
  );
  return {
    water_cpu_s: +water.cpu.toFixed(4), viscous_cpu_s: +viscous.cpu.toFixed(4), ratio: +ratio.toFixed(4),
    viscosity_share: +viscous.share.toFixed(4), front_water: +water.front.toFixed(4), front_viscous: +viscous.front.toFixed(4),
  };
}

/** Stage milliseconds as rounded numbers for the JSON line. */
const roundedStages = (r: RunFigures) => Object.fromEntries(Object.entries(r.stage_ms).map(([k, v]) => [k, Math.round(v)]));

/**
 * Cost per particle-step (ns of CPU time) of the default solver at each scale over the same first `steps`
 * steps (the same physical time), foam off; and each as a ratio to the smallest (issue target: 400k ≤ 1.2 × 25k).
 */
function runScaling(scales: number[], steps: number): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  let first = 0;
  for (const scale of scales) {
    const r = runDamBreak(`scaling`, scale, DEFAULT_PRESSURE_SOLVER, DEFAULT_PRESSURE_TOLERANCE, 0, steps);
    const ns = (1e9 * r.cpu_s) / (r.particles * r.steps);
    if (!first) first = ns;
    const stages = Object.entries(r.stage_ms).filter(([, ms]) => ms >= 0.5).map(([k, ms]) => `${k} ${((1e6 * ms) / (r.particles * r.steps)).toFixed(0)}`).join(', ');
    console.log(
      `cost per particle-step  scale=${scale} particles=${r.particles} steps=${r.steps} cpu_s=${r.cpu_s.toFixed(3)} ns_per_particle_step=${ns.toFixed(1)} ` +
        `ratio_to_${scales[0]}=${(ns / first).toFixed(3)} iters_mean=${r.iterations_mean.toFixed(1)}`,
    );
    console.log(`${''.padEnd(22)} stage wall ns per particle-step: ${stages}`);
    out[`particles_${r.particles}`] = { ns_per_particle_step: +ns.toFixed(2), ratio_to_smallest: +(ns / first).toFixed(4), iters_mean: +r.iterations_mean.toFixed(2) };
  }
  return out;
}

async function main(): Promise<void> {
  if (process.argv.includes('--threads-only')) {
    const native = process.argv.includes('--ref') ? runNative() : null;
    if (native) console.log(`native                 ${native.line}`);
    const figures = await benchThreads(threadCounts(arg('--threads')), 240, native?.psteps_per_s);
    console.log(JSON.stringify({ native_psteps_per_s: native?.psteps_per_s, threads: figures }));
    return;
  }
  if (process.argv.includes('--props-only')) { console.log(JSON.stringify({ free_prop: runPropCost() })); return; }
  if (process.argv.includes('--viscous-only')) { console.log(JSON.stringify({ viscous: runViscousCost() })); return; }
  const rounds = Number(arg('--rounds') ?? 1);
  const scales = (arg('--scales') ?? '1,2,4').split(',').map(Number);
  const scaleSteps = Number(arg('--scale-steps') ?? 60);
  const defaultSolver = (arg('--solver') as PressureSolverName | undefined) ?? DEFAULT_PRESSURE_SOLVER;
  const withRef = process.argv.includes('--ref');
  const summary: Record<string, unknown> = { default_solver: defaultSolver, default_tolerance: DEFAULT_PRESSURE_TOLERANCE };
  for (let round = 0; round < rounds; round++) {
    // 1) the textbook pressure solve inside our solver: 50 sweeps of SOR (ω = 1.9), no early stop
    const gs = runDamBreak('gauss-seidel-50', 1, 'gauss-seidel', 1e-12);
    printRun(gs);
    // 2) CG + MIC(0) stopped at the residual 50 sweeps reach (equal residual)
    const eq = runDamBreak('pcg-at-gs-residual', 1, 'pcg-mic0', gs.residual_median);
    printRun(eq);
    // 3) the default solver and tolerance, foam off: the headline, with the native stick right after it
    const def = runDamBreak('default', 1, defaultSolver, DEFAULT_PRESSURE_TOLERANCE);
    printRun(def);
    const native = withRef ? runNative() : null;
    if (native) console.log(`native                 ${native.line}`);
    // 4) the same with the scene's default foam and spray (look.foam 1)
    const foam = runDamBreak('default+foam', 1, defaultSolver, DEFAULT_PRESSURE_TOLERANCE, 1);
    printRun(foam);
    // 5) the other CG preconditioner at the same tolerance (the default is the faster of the two)
    const other: PressureSolverName = defaultSolver === 'pcg-multigrid' ? 'pcg-mic0' : 'pcg-multigrid';
    const alt = runDamBreak(other, 1, other, DEFAULT_PRESSURE_TOLERANCE);
    printRun(alt);
    summary.scale1 = {
      particles: def.particles, steps: def.steps, wall_s: +def.wall_s.toFixed(4), cpu_s: +def.cpu_s.toFixed(4),
      psteps_per_s: Math.round(def.psteps_per_s), residual_median: def.residual_median, residual_max: def.residual_max,
      gs50_psteps_per_s: Math.round(gs.psteps_per_s), gs50_residual_median: gs.residual_median, gs50_residual_max: gs.residual_max,
      pcg_equal_residual_psteps_per_s: Math.round(eq.psteps_per_s), front: def.front, stage_ms: roundedStages(def),
      with_foam: { wall_s: +foam.wall_s.toFixed(4), cpu_s: +foam.cpu_s.toFixed(4), stage_ms: roundedStages(foam) },
      [`${other}_psteps_per_s`]: Math.round(alt.psteps_per_s), [`${other}_cpu_s`]: +alt.cpu_s.toFixed(4),
      [`${other}_iterations_mean`]: +alt.iterations_mean.toFixed(2), [`${other}_residual_max`]: alt.residual_max,
      pressure_ms: +(def.stage_ms['pressure'] ?? 0).toFixed(1), [`${other}_pressure_ms`]: +(alt.stage_ms['pressure'] ?? 0).toFixed(1),
    };
    if (native) {
      const ratio = def.psteps_per_s / native.psteps_per_s;
      const cpuRatio = native.cpu_s / def.cpu_s; // same particles and steps
      const foamRatio = native.cpu_s / foam.cpu_s;
      console.log(
        `ratio ours/native, one thread, default tolerance, foam off: wall ${ratio.toFixed(3)}  cpu ${cpuRatio.toFixed(3)}   ` +
          `(with foam: cpu ${foamRatio.toFixed(3)}; gauss-seidel-50 ours/native wall: ${(gs.psteps_per_s / native.psteps_per_s).toFixed(3)})`,
      );
      summary.native_psteps_per_s = native.psteps_per_s;
      summary.native_cpu_s = native.cpu_s;
      summary.ratio_ours_native = +ratio.toFixed(4);
      summary.ratio_ours_native_cpu = +cpuRatio.toFixed(4);
      summary.ratio_ours_native_cpu_with_foam = +foamRatio.toFixed(4);
    }
  }
  // the same dam break on 1, 2 and N threads, with ours ÷ native for each (the native stick's figure from above)
  const nativePsteps = typeof summary.native_psteps_per_s === 'number' ? summary.native_psteps_per_s : undefined;
  const threadFigures = await benchThreads(threadCounts(arg('--threads')), 240, nativePsteps);
  summary.threads = threadFigures.map((f) => ({
    threads: f.threads, schedule: f.schedule, psteps_per_s: Math.round(f.psteps_per_s), speedup: +f.speedup.toFixed(4),
    ...(nativePsteps ? { ratio_ours_native: +(f.psteps_per_s / nativePsteps).toFixed(4) } : {}), stage_ms: f.stage_ms,
  }));
  summary.scaling = runScaling(scales, scaleSteps);
  summary.pressure = benchPressure(3);
  summary.free_prop = runPropCost();
  summary.viscous = runViscousCost();
  console.log(JSON.stringify(summary));
}

await main();
