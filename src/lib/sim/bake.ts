// Bake helpers that compare runtimes: the same scene baked in a Node worker thread and in a browser
// Web Worker must give identical frames. Pure TypeScript (no Node or DOM APIs).
import type { Scene } from '../scene/schema';
import { sha256Hex } from '../scene/hash';
import { createSolver, type SolverOptions, type ThreadOptions } from './solver';

/**
 * Bakes nFrames frames after the initial state; returns one Float32Array per frame holding
 * [x₀, y₀, u₀, v₀, x₁, y₁, …] (m, m/s) for the particles in id order (stable across steps).
 */
export function bakeFrames(scene: Scene, nFrames: number, options?: SolverOptions & ThreadOptions): Float32Array[] {
  const sim = createSolver(scene, options);
  const frames: Float32Array[] = [];
  for (let f = 0; f < nFrames; f++) {
    sim.stepFrame();
    frames.push(packFrame(sim.ids, sim.x, sim.y, sim.u, sim.v));
  }
  return frames;
}

/** Packs particle state into [x, y, u, v] quadruples ordered by particle id. */
export function packFrame(ids: Int32Array, x: Float32Array, y: Float32Array, u: Float32Array, v: Float32Array): Float32Array {
  const n = ids.length;
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  order.sort((a, b) => ids[a] - ids[b]);
  const out = new Float32Array(4 * n);
  for (let k = 0; k < n; k++) {
    const i = order[k];
    out[4 * k] = x[i]; out[4 * k + 1] = y[i]; out[4 * k + 2] = u[i]; out[4 * k + 3] = v[i];
  }
  return out;
}

/** SHA-256 hex over the frames' bytes (little-endian float32, frame after frame, each prefixed by its length). */
export function framesChecksum(frames: readonly Float32Array[]): string {
  let total = 0;
  for (const f of frames) total += 4 + f.byteLength;
  const bytes = new Uint8Array(total);
  const view = new DataView(bytes.buffer);
  let off = 0;
  for (const f of frames) {
    view.setUint32(off, f.length, true);
    off += 4;
    const src = new Uint8Array(f.buffer, f.byteOffset, f.byteLength);
    bytes.set(src, off);
    off += f.byteLength;
  }
  return sha256Hex(bytes);
}

/** Bakes and checksums in one call: what a Node worker thread and a browser Web Worker each run and compare. */
export function bakeChecksum(scene: Scene, nFrames: number, options?: SolverOptions & ThreadOptions): string {
  return framesChecksum(bakeFrames(scene, nFrames, options));
}
