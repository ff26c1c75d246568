// One bake thread: pure computation. It runs the solver and hands each encoded clip chunk to the parent as it is
// made; the parent (host.ts) holds the lease, talks to the database and uploads, and ends this thread to stop a bake.
import { parentPort } from 'node:worker_threads';
import { bakeScene } from './bake';
import type { Scene } from '../scene';
import type { FromThread, ToThread } from './host';
import { createSolverTeam, type NodeSolverTeam } from './solver-team';

const port = parentPort!;
const send = (m: FromThread, transfer: ArrayBuffer[] = []) => port.postMessage(m, transfer);
/** The solver's helper threads, kept from bake to bake (started again when the thread count changes). */
let team: NodeSolverTeam | null = null;

port.on('message', async (m: ToThread) => {
  if (m.type !== 'bake') return;
  const unacked = new Int32Array(m.credit);
  try {
    const threads = Math.max(1, m.threads | 0);
    if (team && team.threads !== threads) { await team.end(); team = null; }
    if (!team && threads > 1) team = await createSolverTeam(threads);
    const result = await bakeScene(m.scene as Scene, m.sceneHash, {
      onFrame: (done, total) => {
        send({ type: 'frame', done, total });
        return 'go';
      },
      onChunk: (chunk) => {
        // Hand the bytes over without a copy when the chunk owns its whole buffer.
        // Wait while the parent holds a window's worth of unacknowledged bytes (one chunk always goes: a chunk larger
        // than the window must not stall). The short timeout lets a terminate() end the thread while it waits.
        for (let held = Atomics.load(unacked, 0); held > 0 && held + chunk.length > m.windowBytes; held = Atomics.load(unacked, 0)) {
          Atomics.wait(unacked, 0, held, 100);
        }
        Atomics.add(unacked, 0, chunk.length);
        const own = chunk.byteOffset === 0 && chunk.byteLength === chunk.buffer.byteLength;
        send({ type: 'chunk', bytes: chunk }, own ? [chunk.buffer as ArrayBuffer] : []);
      },
    }, { team });
    if (!result) throw new Error('the bake stopped');
    send({ type: 'baked', head: result.clip, stats: result.stats, framesTotal: result.framesTotal, particleCapacity: result.particleCapacity, threads });
  } catch (err) {
    send({ type: 'failed', message: err instanceof Error ? err.message : String(err) });
  }
});
