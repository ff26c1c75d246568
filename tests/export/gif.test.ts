// The GIF export's encoder (src/lib/export/gif.ts): one palette for the file, frames written by omggif. Read back
// with omggif's decoder: frame count, delays, loop, and colour error no worse than gif.js's own per-frame-palette
// encoder (the one the export used before) on the same frames.
import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { GifReader } from 'omggif';
import { encodeGif } from '../../src/lib/export/gif';
import { gifDelays } from '../../src/lib/export/layout';

const require = createRequire(import.meta.url);
// gif.js's own encoder (what its workers run), for the comparison.
const GIFEncoder = require('gif.js/src/GIFEncoder.js');

const W = 320;
const H = 180;

/** A splash over a plate: a sky gradient, a grey wall, blue liquid rising and falling, white foam specks, a burn-in band. */
function frames(count: number): { data: Uint8ClampedArray }[] {
  const out: { data: Uint8ClampedArray }[] = [];
  let seed = 3;
  const rnd = () => ((seed = (seed * 1664525 + 1013904223) >>> 0) / 4294967296);
  for (let f = 0; f < count; f++) {
    const d = new Uint8ClampedArray(W * H * 4);
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const i = 4 * (y * W + x);
        let r = 70 - (y * 50) / H, g = 90 - (y * 40) / H, b = 120 - (y * 50) / H;
        if (x > W * 0.85 && y > H * 0.3) [r, g, b] = [90, 90, 85];
        const surface = H * 0.6 - 25 * Math.sin((x / W) * Math.PI) * Math.sin((f / count) * Math.PI) + 3 * Math.sin(x / 9 + f);
        if (y > surface) {
          const depth = Math.min(1, (y - surface) / 40);
          [r, g, b] = [58 * (1 - 0.5 * depth) + 60 * (1 - depth), 143 * (1 - 0.5 * depth), 183 * (1 - 0.4 * depth)];
          if (y - surface < 2) [r, g, b] = [190, 222, 236];
        }
        if (y > H - 14) [r, g, b] = [20, 20, 20];
        d[i] = r; d[i + 1] = g; d[i + 2] = b; d[i + 3] = 255;
      }
    }
    for (let k = 0; k < 120; k++) {
      const x = Math.floor(rnd() * W), y = Math.floor(H * 0.4 + rnd() * H * 0.25);
      const i = 4 * (y * W + x);
      d[i] = 246; d[i + 1] = 250; d[i + 2] = 252;
    }
    out.push({ data: d });
  }
  return out;
}

function decodeAll(bytes: Uint8Array): { reader: GifReader; pixels: Uint8Array[] } {
  const reader = new GifReader(bytes);
  const pixels: Uint8Array[] = [];
  for (let i = 0; i < reader.numFrames(); i++) {
    const p = new Uint8Array(W * H * 4);
    reader.decodeAndBlitFrameRGBA(i, p);
    pixels.push(p);
  }
  return { reader, pixels };
}

/** Mean absolute error per colour channel (0–255) over every frame. */
function meanError(src: { data: Uint8ClampedArray }[], decoded: Uint8Array[]): number {
  let sum = 0, n = 0;
  src.forEach((s, f) => {
    for (let i = 0; i < s.data.length; i += 4) {
      for (let c = 0; c < 3; c++) sum += Math.abs(s.data[i + c] - decoded[f][i + c]);
      n += 3;
    }
  });
  return sum / n;
}

function gifJsBytes(src: { data: Uint8ClampedArray }[], delaysCs: number[]): Uint8Array {
  const enc = new GIFEncoder(W, H);
  enc.writeHeader(); // gif.js's worker writes it before the first frame
  enc.setRepeat(0);
  enc.setQuality(10); // the export's old setting
  src.forEach((s, i) => {
    enc.setDelay(delaysCs[i] * 10);
    enc.addFrame(s.data);
  });
  enc.finish();
  const pages: Uint8Array[] = enc.out.pages;
  const bytes = new Uint8Array(pages.length * enc.out.constructor.pageSize);
  pages.forEach((p, k) => bytes.set(p, k * enc.out.constructor.pageSize));
  return bytes;
}

describe('GIF export encoder', () => {
  const src = frames(24);
  const delays = gifDelays(24, src.length);

  it('writes every frame with its delay and the loop, readable by an independent decoder', async () => {
    const bytes = await encodeGif({ width: W, height: H, frames: src, delaysCs: delays, loop: true }, () => {}, new AbortController().signal);
    expect(bytes[bytes.length - 1]).toBe(0x3b); // GIF89a trailer
    const { reader } = decodeAll(bytes);
    expect([reader.width, reader.height, reader.numFrames()]).toEqual([W, H, 24]);
    expect(reader.loopCount()).toBe(0); // 0: forever (NETSCAPE2.0 block)
    expect(Array.from({ length: 24 }, (_, i) => reader.frameInfo(i).delay)).toEqual(delays);
    const once = await encodeGif({ width: W, height: H, frames: src.slice(0, 2), delaysCs: delays, loop: false }, () => {}, new AbortController().signal);
    expect(new GifReader(once).loopCount()).toBe(null);
  });

  it('keeps colours as close as gif.js with a palette per frame did', async () => {
    const ours = decodeAll(await encodeGif({ width: W, height: H, frames: src, delaysCs: delays, loop: true }, () => {}, new AbortController().signal));
    const theirs = decodeAll(gifJsBytes(src, delays));
    const eOurs = meanError(src, ours.pixels);
    const eTheirs = meanError(src, theirs.pixels);
    // Both well under a level of 8 a channel, and ours within 10 % of gif.js's (or better).
    expect(eTheirs).toBeLessThan(8);
    console.log(`GIF mean error a channel: ours ${eOurs.toFixed(2)}, gif.js ${eTheirs.toFixed(2)}`);
    expect(eOurs).toBeLessThan(eTheirs * 1.1);
  });

  it('stops when cancelled', async () => {
    const ac = new AbortController();
    const p = encodeGif({ width: W, height: H, frames: src, delaysCs: delays, loop: true }, (f) => f > 0.2 && ac.abort(), ac.signal);
    await expect(p).rejects.toThrow(/cancelled/);
  });
});
