// The clip format: positions come back within the quantization bound, speeds within one level,
// and reading one frame fetches only the header, the index and that frame's chunk.
import { describe, it, expect } from 'vitest';
import { ClipWriter } from '../../src/lib/clip/encode';
import { ClipReader } from '../../src/lib/clip/decode';
import { positionErrorBound } from '../../src/lib/clip/format';

/** Deterministic pseudo-random numbers (mulberry32) so failures reproduce. */
function rng(seed: number) {
  return () => {
    seed |= 0;
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function makeFrames(frames: number, n: number, w: number, h: number) {
  const r = rng(7);
  return Array.from({ length: frames }, (_, f) => {
    const count = n - f * 3; // particles leave through a drain as the clip goes on
    const x = new Float64Array(count);
    const y = new Float64Array(count);
    const u = new Float64Array(count);
    const v = new Float64Array(count);
    for (let i = 0; i < count; i++) {
      x[i] = r() * w;
      y[i] = r() * h * 0.6;
      u[i] = (r() - 0.5) * 3;
      v[i] = (r() - 0.5) * 3 - f * 0.1;
    }
    return { count, x, y, u, v };
  });
}

const options = { startFrame: 1001, endFrame: 1030, fps: 24, tankWidth: 1.92, tankHeight: 1.08, particleCapacity: 5000, solverBuild: 'test', sceneHash: 'abc' };

describe('clip format', () => {
  const frames = makeFrames(30, 5000, options.tankWidth, options.tankHeight);
  const writer = new ClipWriter(options);
  for (const f of frames) writer.addFrame(f.count, f.x, f.y, f.u, f.v);
  const bytes = writer.finish();

  it('keeps positions within half a quantization step, which is within 1/4000 of the tank (issue target)', async () => {
    const reader = await ClipReader.fromBytes(bytes);
    const bound = positionErrorBound(reader.header);
    expect(bound).toBeLessThanOrEqual(Math.max(options.tankWidth, options.tankHeight) / 4000);
    for (const k of [0, 7, 8, 29]) {
      const src = frames[k];
      const got = await reader.frameAt(1001 + k);
      expect(got.count).toBe(src.count);
      // Frames hold positions in bin order, not identities: every decoded particle must have a source particle
      // within the bound (Chebyshev distance), and every bin must hold as many particles as before.
      const cell = reader.header.binSize;
      const grid = new Map<number, number[]>();
      const binCount = new Map<number, number>();
      const keyOf = (x: number, y: number) => Math.floor(y / cell) * 100000 + Math.floor(x / cell);
      for (let i = 0; i < src.count; i++) {
        const key = keyOf(src.x[i], src.y[i]);
        (grid.get(key) ?? grid.set(key, []).get(key)!).push(i);
        binCount.set(key, (binCount.get(key) ?? 0) + 1);
      }
      let worst = 0;
      for (let j = 0; j < got.count; j++) {
        const key = keyOf(got.x[j], got.y[j]);
        binCount.set(key, (binCount.get(key) ?? 0) - 1);
        let best = Infinity;
        for (const i of grid.get(key) ?? []) best = Math.min(best, Math.max(Math.abs(src.x[i] - got.x[j]), Math.abs(src.y[i] - got.y[j])));
        worst = Math.max(worst, best);
      }
      // Decoded positions are float32: allow its rounding (2^-24 relative) on top of the quantization bound.
      expect(worst).toBeLessThanOrEqual(bound + 2 * Math.max(options.tankWidth, options.tankHeight) * 2 ** -24);
      expect([...binCount.values()].every((c) => c === 0)).toBe(true);
      // Speeds: the maximum is exact (f32), each speed within one of 255 levels.
      const maxSrc = Math.max(...Array.from({ length: src.count }, (_, i) => Math.hypot(src.u[i], src.v[i])));
      expect(got.maxSpeed).toBeCloseTo(maxSrc, 5);
      const speedsSrc = Array.from({ length: src.count }, (_, i) => Math.hypot(src.u[i], src.v[i])).sort((p, q) => p - q);
      const speedsGot = Array.from(got.speed).sort((p, q) => p - q);
      for (let i = 0; i < speedsSrc.length; i += 97) expect(Math.abs(speedsSrc[i] - speedsGot[i])).toBeLessThanOrEqual(maxSrc / 255);
    }
  });

  it('reads one frame without fetching the rest of the clip', async () => {
    const ranges: [number, number][] = [];
    const reader = await ClipReader.open(async (a, b) => {
      ranges.push([a, b]);
      return bytes.subarray(a, Math.min(b + 1, bytes.length));
    });
    ranges.length = 0;
    await reader.frameAt(1017);
    const k = reader.chunkOf(1017);
    expect(ranges).toEqual([[reader.index[k].offset, reader.index[k].offset + reader.index[k].length - 1]]);
    await reader.frameAt(1018); // same chunk: served from the cache
    expect(ranges).toHaveLength(1);
  });

  it('refuses frames outside the range and bytes that are not a clip', async () => {
    const reader = await ClipReader.fromBytes(bytes);
    await expect(reader.frameAt(1000)).rejects.toThrow(/outside the clip/);
    await expect(reader.frameAt(1031)).rejects.toThrow(/outside the clip/);
    await expect(ClipReader.fromBytes(new TextEncoder().encode('{"not":"a clip"}'))).rejects.toThrow(/not a Tidemark clip/);
  });

  it('refuses a frame too many and a clip with frames missing', () => {
    const w = new ClipWriter({ ...options, endFrame: 1002 });
    const f = frames[0];
    w.addFrame(f.count, f.x, f.y, f.u, f.v);
    expect(() => w.finish()).toThrow(/1 of 2 frames/);
    w.addFrame(f.count, f.x, f.y, f.u, f.v);
    expect(() => w.addFrame(f.count, f.x, f.y, f.u, f.v)).toThrow(/already has/);
  });
});
