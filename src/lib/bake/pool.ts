// A pool of bake worker threads (node:worker_threads). The app server runs one; so does `npm run worker`.
import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { defaultWorkerId } from './runner';

/** Pool size: BAKE_WORKERS, else cores − 1, at least 1. 0 disables baking in this process. */
export function poolSize(): number {
  const configured = process.env.BAKE_WORKERS;
  if (configured !== undefined && configured !== '') return Math.max(0, Number(configured) | 0);
  return Math.max(1, availableParallelism() - 1);
}

/** The project root: the worker threads load their TypeScript from src/lib/bake (run with the sources present). */
function projectRoot(): string {
  return process.env.TIDEMARK_ROOT ?? process.cwd();
}

export interface BakePool {
  size: number;
  stop(): Promise<void>;
}

/** Starts `size` worker threads; a thread that crashes is replaced after a pause. */
export function startBakePool(size = poolSize(), log = (s: string) => console.log(`[bake pool] ${s}`)): BakePool {
  const dir = path.join(projectRoot(), 'src', 'lib', 'bake');
  const boot = pathToFileURL(path.join(dir, 'thread-boot.mjs'));
  const entry = pathToFileURL(path.join(dir, 'thread.ts')).href;
  let stopping = false;
  const threads = new Set<Worker>();
  const spawn = (slot: number) => {
    const worker = new Worker(boot, { workerData: { entry, workerId: defaultWorkerId(slot) } });
    threads.add(worker);
    worker.on('error', (err) => log(`thread ${slot} crashed: ${err.message}`));
    worker.on('exit', () => {
      threads.delete(worker);
      if (!stopping) setTimeout(() => !stopping && spawn(slot), 2000).unref();
    });
  };
  for (let i = 0; i < size; i++) spawn(i);
  if (size > 0) log(`${size} bake worker thread(s) started`);
  return {
    size,
    stop: async () => {
      stopping = true;
      await Promise.all(
        [...threads].map(
          (w) =>
            new Promise<void>((resolve) => {
              const timer = setTimeout(() => void w.terminate().then(() => resolve()), 10_000);
              w.once('exit', () => {
                clearTimeout(timer);
                resolve();
              });
              w.postMessage('stop');
            }),
        ),
      );
    },
  };
}

let serverPool: BakePool | undefined;

/** Starts the app server's own pool once (called from the middleware on the first request). */
export function ensureServerBakePool(): void {
  if (serverPool || process.env.TIDEMARK_NO_POOL === '1') return;
  serverPool = startBakePool();
}
