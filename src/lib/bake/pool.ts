// Bake slots: each runs the claim-bake loop on this (the parent) thread, where its lease is renewed on a timer,
// and its solver in a bake thread of its own (host.ts, with memory limits). `npm start` and `npm run worker` run
// them in a bake worker process (src/cli/worker.ts); the web server runs none unless BAKE_WORKERS is set.
import { availableParallelism } from 'node:os';
import { defaultWorkerId, runBakeLoop } from './runner';
import { BakeThread } from './host';
import { bakeThreads } from './solver-team';

/** Pool size: BAKE_WORKERS, else cores − 1, at least 1. 0 disables baking in this process. */
export function poolSize(): number {
  const configured = process.env.BAKE_WORKERS;
  if (configured !== undefined && configured !== '') return Math.max(0, Number(configured) | 0);
  return Math.max(1, availableParallelism() - 1);
}

export interface BakePool {
  size: number;
  /** Hands running jobs back to the queue (lease released, attempt not counted) and ends the threads. */
  stop(): Promise<void>;
}

/** Starts `size` bake slots; a slot whose loop fails is started again after a pause. */
export function startBakePool(size = poolSize(), log = (s: string) => console.log(`[bake pool] ${s}`)): BakePool {
  const controller = new AbortController();
  const slot = async (n: number) => {
    const workerId = defaultWorkerId(n);
    const slotLog = (s: string) => console.log(`[bake ${workerId}] ${s}`);
    while (!controller.signal.aborted) {
      try {
        await runBakeLoop({ workerId, signal: controller.signal, thread: new BakeThread(slotLog, undefined, bakeThreads(size)), log: slotLog });
      } catch (err) {
        log(`slot ${n} stopped: ${err instanceof Error ? err.message : err}; starting again`);
        await new Promise((r) => setTimeout(r, 2000));
      }
    }
  };
  const running = Array.from({ length: size }, (_, n) => slot(n));
  if (size > 0) log(`${size} bake worker thread(s) started`);
  return {
    size,
    stop: async () => {
      controller.abort();
      await Promise.all(running);
    },
  };
}

let serverPool: BakePool | undefined;

/**
 * Starts the web server's own bake slots once (called from the middleware on the first request) — only when
 * BAKE_WORKERS is set: by default bakes run in a separate worker process, so a bake cannot take the site down.
 * On SIGTERM the slots hand their jobs back before the process exits.
 */
export function ensureServerBakePool(): void {
  if (serverPool || process.env.TIDEMARK_NO_POOL === '1' || !process.env.BAKE_WORKERS) return;
  serverPool = startBakePool(poolSize());
  if (serverPool.size === 0) return;
  const pool = serverPool;
  process.once('SIGTERM', () => void pool.stop().finally(() => process.exit(0)));
}
