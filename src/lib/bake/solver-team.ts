// Node's side of a threaded bake: starts the worker threads of a solver team (src/lib/sim/parallel.ts) and
// says how many threads one bake uses (BAKE_THREADS, default: this process's share of the cores).
import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { fileURLToPath, pathToFileURL } from 'node:url';
import path from 'node:path';
import { SolverTeam, type TeamAttach, type TeamSchedule } from '../sim/parallel';

/** Heap a team worker may use, MB: it holds only views of the shared state and the kernels' code. */
const MEMBER_HEAP_MB = 64;

/**
 * Threads one bake uses: BAKE_THREADS when set (≥ 1), else the cores this process may use divided among its
 * `slots` bake slots (at least 1): a worker process with one slot on a 16-core machine bakes on 16 threads.
 */
export function bakeThreads(slots = 1): number {
  const configured = process.env.BAKE_THREADS;
  if (configured !== undefined && configured !== '') {
    const n = Number(configured);
    if (!Number.isInteger(n) || n < 1) throw new Error(`BAKE_THREADS must be a whole number ≥ 1 (got "${configured}")`);
    return n;
  }
  return Math.max(1, Math.floor(availableParallelism() / Math.max(1, slots)));
}

export interface NodeSolverTeam extends SolverTeam {
  /** Ends the worker threads. */
  end(): Promise<void>;
}

/**
 * Starts threads − 1 worker threads and resolves once each has loaded the kernels; the caller's thread is the
 * team's first; `schedule` as in parallel.ts (TeamSchedule). Workers are unref'd: an idle team does not keep the process alive.
 */
export async function createSolverTeam(threads: number, schedule: TeamSchedule = 'adaptive'): Promise<NodeSolverTeam> {
  if (!Number.isInteger(threads) || threads < 1) throw new Error(`a solver team needs a whole number ≥ 1 of threads (got ${threads})`);
  const here = path.dirname(fileURLToPath(import.meta.url));
  const boot = path.join(here, 'thread-boot.mjs');
  const entry = path.join(here, 'solver-team-member.ts');
  const workers: Worker[] = [];
  const ready: Promise<void>[] = [];
  for (let rank = 1; rank < threads; rank++) {
    const w = new Worker(boot, {
      workerData: { entry: pathToFileURL(entry).href, rank },
      resourceLimits: { maxOldGenerationSizeMb: MEMBER_HEAP_MB },
    });
    ready.push(new Promise<void>((resolve, reject) => {
      const onMessage = (m: unknown) => { if (m === 'ready') { w.off('error', reject); resolve(); } };
      w.on('message', onMessage);
      w.once('error', reject);
    }));
    workers.push(w);
  }
  try {
    await Promise.all(ready);
  } catch (err) {
    await Promise.all(workers.map((w) => w.terminate()));
    throw err;
  }
  for (const w of workers) w.unref();
  const team = new SolverTeam({
    workers: workers.length,
    post: (message: TeamAttach) => { for (const w of workers) w.postMessage(message); },
  }, schedule) as NodeSolverTeam;
  team.end = async () => {
    team.close();
    await Promise.all(workers.map((w) => w.terminate()));
  };
  return team;
}
