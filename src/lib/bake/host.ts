// The parent's side of a bake thread: starts it with memory limits, sends it a scene, passes its frames and clip
// chunks on, and ends it (a solve cannot be interrupted any other way) when the bake must stop.
// Backpressure: a SharedArrayBuffer counter holds the chunk bytes sent and not yet acknowledged. The thread waits
// (Atomics.wait) before sending a chunk that would take it over the window; the parent subtracts a chunk's bytes
// once onChunk's promise resolved (the upload has room), so a slow store pauses the solver instead of filling memory.
import { Worker } from 'node:worker_threads';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { FrameStats } from '../sim';
import type { Scene } from '../scene';
import { bakeThreads } from './solver-team';

export type ToThread = {
  type: 'bake';
  scene: Scene;
  sceneHash: string;
  /** Int32 [0]: chunk bytes sent and not yet acknowledged. */
  credit: SharedArrayBuffer;
  windowBytes: number;
  /** Threads the solver may use (BAKE_THREADS; solver-team.ts). */
  threads: number;
};
export type FromThread =
  | { type: 'frame'; done: number; total: number }
  | { type: 'chunk'; bytes: Uint8Array }
  | { type: 'baked'; head: Uint8Array; stats: FrameStats[]; framesTotal: number; particleCapacity: number; threads: number }
  | { type: 'failed'; message: string };

export interface ThreadBake {
  /** Bytes before the first chunk (magic, header, index). */
  head: Uint8Array;
  stats: FrameStats[];
  framesTotal: number;
  particleCapacity: number;
  /** Threads the solver ran on. */
  threads: number;
}

/** The bake thread ran out of the memory it may use: the same scene will again, so retrying will not help. */
export class ThreadOutOfMemory extends Error {}

/** Memory a bake thread may use (V8 old generation), MB: BAKE_THREAD_MEMORY_MB, default 4096. */
export function threadMemoryMb(): number {
  return Number(process.env.BAKE_THREAD_MEMORY_MB ?? 4096);
}

/** Chunk bytes a bake thread may have sent and not yet had acknowledged: BAKE_CHUNK_WINDOW_MB, default 16. */
export function chunkWindowBytes(): number {
  return Number(process.env.BAKE_CHUNK_WINDOW_MB ?? 16) * 1024 * 1024;
}

/** The project root: bake threads load their TypeScript from src/lib/bake (run with the sources present). */
function projectRoot(): string {
  return process.env.TIDEMARK_ROOT ?? process.cwd();
}

/** One bake thread, started on first use and again after it was ended or crashed. Runs one bake at a time. */
export class BakeThread {
  private worker: Worker | null = null;
  /** The most chunk bytes sent by the thread and not yet acknowledged (last bake). */
  peakUnackedBytes = 0;

  constructor(
    private readonly log: (s: string) => void = () => {},
    private readonly windowBytes = chunkWindowBytes(),
    /** Threads each bake's solver uses (the bake thread starts threads − 1 more): BAKE_THREADS, or a share of the cores. */
    readonly solverThreads = bakeThreads(),
  ) {}

  private start(): Worker {
    const dir = path.join(projectRoot(), 'src', 'lib', 'bake');
    const worker = new Worker(pathToFileURL(path.join(dir, 'thread-boot.mjs')), {
      workerData: { entry: pathToFileURL(path.join(dir, 'thread.ts')).href },
      resourceLimits: { maxOldGenerationSizeMb: threadMemoryMb() },
    });
    worker.on('exit', () => {
      if (this.worker === worker) this.worker = null;
    });
    // A thread that dies while idle must not take the process with it (an 'error' nobody listens to would).
    worker.on('error', (err) => {
      if (worker.listenerCount('error') === 1) this.log(`idle bake thread stopped: ${err.message}`);
    });
    return worker;
  }

  /** Starts the thread now, so that it has loaded the solver before the first bake. */
  warm(): void {
    this.worker ??= this.start();
  }

  /**
   * Bakes the scene in the thread. onFrame and onChunk are called in order as the thread reports; a chunk is
   * acknowledged to the thread when onChunk's promise resolves, and the next onChunk waits for it. The promise
   * rejects with the signal's reason when it aborts (the thread is ended), or when the bake fails.
   */
  bake(
    scene: Scene,
    sceneHash: string,
    hooks: { onFrame?: (done: number, total: number) => void; onChunk: (chunk: Uint8Array) => void | Promise<void> },
    signal: AbortSignal,
  ): Promise<ThreadBake> {
    signal.throwIfAborted();
    const worker = (this.worker ??= this.start());
    const credit = new SharedArrayBuffer(4);
    const unacked = new Int32Array(credit);
    this.peakUnackedBytes = 0;
    return new Promise<ThreadBake>((resolve, reject) => {
      let settled = false;
      // The chunks in order: each handed to onChunk after the one before was acknowledged.
      let chunks = Promise.resolve();
      const fail = (err: unknown) => {
        if (settled) return;
        // A hook that throws (the upload failed) ends this bake.
        void this.end();
        done(() => reject(err));
      };
      const done = (fn: () => void) => {
        if (settled) return;
        settled = true;
        worker.off('message', onMessage);
        worker.off('error', onError);
        worker.off('exit', onExit);
        signal.removeEventListener('abort', onAbort);
        fn();
      };
      const onMessage = (m: FromThread) => {
        try {
          if (m.type === 'frame') hooks.onFrame?.(m.done, m.total);
          else if (m.type === 'chunk') {
            const n = m.bytes.length;
            this.peakUnackedBytes = Math.max(this.peakUnackedBytes, Atomics.load(unacked, 0));
            chunks = chunks
              .then(() => (settled ? undefined : hooks.onChunk(m.bytes)))
              .then(() => {
                Atomics.sub(unacked, 0, n);
                Atomics.notify(unacked, 0);
              });
            chunks.catch(fail);
          } else if (m.type === 'baked') chunks.then(() => done(() => resolve(m)), () => {});
          else if (m.type === 'failed') done(() => reject(new Error(m.message)));
        } catch (err) {
          fail(err);
        }
      };
      const onError = (err: Error & { code?: string }) => {
        this.log(`bake thread crashed: ${err.message}`);
        const oom = err.code === 'ERR_WORKER_OUT_OF_MEMORY';
        done(() =>
          reject(oom ? new ThreadOutOfMemory(`The bake needed more memory than a bake thread may use (${threadMemoryMb()} MB)`) : err),
        );
      };
      const onExit = (code: number) => done(() => reject(new Error(`the bake thread stopped (exit code ${code})`)));
      const onAbort = () => {
        void this.end();
        done(() => reject(signal.reason));
      };
      worker.on('message', onMessage);
      worker.on('error', onError);
      worker.on('exit', onExit);
      signal.addEventListener('abort', onAbort, { once: true });
      worker.postMessage({ type: 'bake', scene, sceneHash, credit, windowBytes: this.windowBytes, threads: this.solverThreads } satisfies ToThread);
    });
  }

  /** Ends the thread (the next bake starts a new one). */
  async end(): Promise<void> {
    const w = this.worker;
    this.worker = null;
    if (w) await w.terminate();
  }
}
