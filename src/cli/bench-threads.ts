// Threads section of the sim bench: the reference dam break (default solver and tolerance, foam off) on 1, 2
// and N threads (src/lib/sim/parallel.ts), M particle-steps per second, the speed-up over one thread, ours ÷
// native when the native stick ran in the same run, and each stage's milliseconds. Every thread count bakes the
// same bytes (checked here by the final positions' checksum). 'threaded' forces the threaded stages; 'adaptive'
// (what bakes use) picks per stage whichever ran faster lately. Wall time only: on a machine shared with other
// work the figures say what that machine gave in that minute.
import { availableParallelism } from 'node:os';
import { createSolver } from '../lib/sim/solver';
import { referenceDamBreak } from '../lib/sim/reference';
import { sha256Hex } from '../lib/scene/hash';
import { parseScene } from '../lib/scene/schema';
import { createSolverTeam, type NodeSolverTeam } from '../lib/bake/solver-team';
import type { TeamSchedule } from '../lib/sim/parallel';

export interface ThreadFigures {
  threads: number; schedule: TeamSchedule | 'serial'; particles: number; steps: number; wall_s: number; psteps_per_s: number;
  speedup: number; checksum: string; stage_ms: Record<string, number>;
}

function damBreak(steps: number) {
  const setup = referenceDamBreak(1, undefined, undefined, steps);
  const r = parseScene({ ...setup.scene, look: { foam: 0 } });
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return { ...setup, scene: r.scene };
}

function runOnce(team: NodeSolverTeam | null, steps: number): Omit<ThreadFigures, 'threads' | 'schedule' | 'speedup'> {
  const setup = damBreak(steps);
  const sim = createSolver(setup.scene, { ...setup.options, team });
  const stageMs: Record<string, number> = {};
  const t0 = performance.now();
  for (let s = 0; s < setup.steps; s++) {
    const st = sim.stepFrame();
    for (const [k, ms] of Object.entries(st.stageMs)) stageMs[k] = (stageMs[k] ?? 0) + ms;
  }
  const wall = (performance.now() - t0) / 1000;
  const x = sim.x;
  return {
    particles: sim.count, steps: setup.steps, wall_s: wall, psteps_per_s: (sim.count * setup.steps) / wall,
    checksum: sha256Hex(new Uint8Array(x.buffer, x.byteOffset, x.byteLength)).slice(0, 16),
    stage_ms: Object.fromEntries(Object.entries(stageMs).map(([k, v]) => [k, Math.round(v)])),
  };
}

/** Thread counts to measure: 1, 2 and the cores available (deduplicated), or `--threads 1,2,4`. */
export function threadCounts(arg?: string): number[] {
  const list = arg ? arg.split(',').map(Number) : [1, 2, availableParallelism()];
  return [...new Set(list.filter((n) => Number.isInteger(n) && n >= 1))].sort((a, b) => a - b);
}

/** Runs the thread section; `nativePsteps` (from the native stick in the same run) adds ours ÷ native per line. */
export async function benchThreads(counts: number[], steps = 240, nativePsteps?: number): Promise<ThreadFigures[]> {
  const out: ThreadFigures[] = [];
  console.log(`threads: ${availableParallelism()} cores available to this process; load average ${(await import('node:os')).loadavg().map((l) => l.toFixed(1)).join(' ')}`);
  // warm the JIT on the serial path once, so that the 1-thread figure is not paying for compilation
  runOnce(null, 24);
  let base = 0;
  const print = (f: ThreadFigures) => {
    const native = nativePsteps ? ` ours/native=${(f.psteps_per_s / nativePsteps).toFixed(3)}` : '';
    console.log(
      `threads=${f.threads} schedule=${f.schedule.padEnd(8)} particles=${f.particles} steps=${f.steps} wall_s=${f.wall_s.toFixed(3)} ` +
        `M_psteps_per_s=${(f.psteps_per_s / 1e6).toFixed(3)} speedup_vs_1=${f.speedup.toFixed(3)}${native} checksum=${f.checksum}`,
    );
    console.log(`${''.padEnd(22)} stages ms: ${Object.entries(f.stage_ms).filter(([, v]) => v > 0).map(([k, v]) => `${k} ${v}`).join(', ')}`);
  };
  for (const n of counts) {
    const schedules: TeamSchedule[] = n === 1 ? [] : ['threaded', 'adaptive'];
    if (n === 1) {
      const r = runOnce(null, steps);
      base = r.psteps_per_s;
      const f = { ...r, threads: 1, schedule: 'serial' as const, speedup: 1 };
      out.push(f); print(f);
      continue;
    }
    for (const schedule of schedules) {
      const team = await createSolverTeam(n, schedule);
      try {
        runOnce(team, 12); // the workers' JIT
        const r = runOnce(team, steps);
        const f = { ...r, threads: n, schedule, speedup: base ? r.psteps_per_s / base : 0 };
        out.push(f); print(f);
      } finally {
        await team.end();
      }
    }
  }
  const sums = new Set(out.map((f) => f.checksum));
  console.log(`threads: final positions ${sums.size === 1 ? 'identical on every thread count' : 'DIFFER between thread counts'} (${[...sums].join(', ')})`);
  return out;
}

// `npx tsx src/cli/bench-threads.ts [--threads 1,2,4] [--steps 240]`: this section alone
if (process.argv[1] && process.argv[1].endsWith('bench-threads.ts')) {
  const i = process.argv.indexOf('--threads'), j = process.argv.indexOf('--steps');
  const figures = await benchThreads(threadCounts(i >= 0 ? process.argv[i + 1] : undefined), j >= 0 ? Number(process.argv[j + 1]) : 240);
  console.log(JSON.stringify({ threads: figures.map(({ stage_ms: _s, ...f }) => f) }));
}
