// Animated GIF from rendered frames: one 256-colour palette for the whole file, learned by NeuQuant (Dekker 1994,
// "Kohonen neural networks for optimal colour quantization"; gif.js's typed port) from pixels sampled across the
// frames; every pixel mapped to it through a cache of every 24-bit colour (32 MB, each looked up once;
// a coarser key, 6 or 7 bits a channel, tripled the colour error on smooth plates); LZW and the file's blocks written by omggif.
// gif.js learned a palette per frame (about half of its ~250 ms a 960×540 frame) and looked every pixel up again;
// one palette costs that once, and the colours no longer flicker from frame to frame. Per-frame delays from gifDelays().
import NeuQuant from 'gif.js/src/TypedNeuQuant.js';
import { GifWriter } from 'omggif';
import { yieldToPage } from './cancel';

export interface GifInput {
  width: number;
  height: number;
  /** RGBA pixels of each frame (straight alpha; alpha is ignored, frames are opaque). */
  frames: { data: Uint8ClampedArray | Uint8Array }[];
  /** Per frame, hundredths of a second. */
  delaysCs: number[];
  loop: boolean;
}

/** Frames the palette is learned from (spread over the file), and NeuQuant's sampling factor (gif.js's default 10). */
const PALETTE_FRAMES = 8;
const SAMPLE_FACTOR = 10;

/**
 * The palette of the frames: NeuQuant over one frame's worth of pixels, taken from up to PALETTE_FRAMES frames spread
 * over the file (frame k of K gives every K-th pixel from offset k). Returns the network, whose lookupRGB maps a
 * colour to its palette index, and the palette as 0xRRGGBB numbers.
 */
export function learnPalette(input: GifInput): { quantiser: { lookupRGB(r: number, g: number, b: number): number }; palette: number[] } {
  const n = input.width * input.height;
  const picks = Math.min(PALETTE_FRAMES, input.frames.length);
  const sample = new Uint8Array(3 * n);
  let q = 0;
  for (let k = 0; k < picks; k++) {
    const src = input.frames[Math.floor(((k + 0.5) * input.frames.length) / picks)].data;
    for (let p = k; p < n; p += picks) {
      sample[q++] = src[4 * p];
      sample[q++] = src[4 * p + 1];
      sample[q++] = src[4 * p + 2];
    }
  }
  const nq = new NeuQuant(sample.subarray(0, q), SAMPLE_FACTOR);
  nq.buildColormap();
  const map = nq.getColormap();
  const palette: number[] = [];
  for (let i = 0; i < map.length; i += 3) palette.push((map[i] << 16) | (map[i + 1] << 8) | map[i + 2]);
  return { quantiser: nq, palette };
}

/** Palette indices of one frame's pixels, through `cache` (2²⁴ entries, −1: not looked up yet; key: 0xRRGGBB). */
export function indexFrame(data: Uint8ClampedArray | Uint8Array, out: Uint8Array, cache: Int16Array, quantiser: { lookupRGB(r: number, g: number, b: number): number }) {
  for (let p = 0, i = 0; p < out.length; p++, i += 4) {
    const r = data[i], g = data[i + 1], b = data[i + 2];
    const key = (r << 16) | (g << 8) | b;
    let c = cache[key];
    if (c < 0) c = cache[key] = quantiser.lookupRGB(r, g, b);
    out[p] = c;
  }
}

/** Encodes the frames; resolves to the GIF bytes. Yields to the page between frames and stops when `signal` aborts. */
export async function encodeGif(input: GifInput, onProgress: (fraction: number) => void, signal: AbortSignal): Promise<Uint8Array> {
  const { width, height } = input;
  await yieldToPage(signal);
  const { quantiser, palette } = learnPalette(input);
  const cache = new Int16Array(1 << 24).fill(-1);
  const indexed = new Uint8Array(width * height);
  // LZW of 8-bit indices never needs more than 12 bits a pixel, plus a length byte per 255-byte sub-block.
  const scratch = new Uint8Array(Math.ceil(width * height * 1.51) + 4096);
  const writer = new GifWriter(scratch, width, height, input.loop ? { palette, loop: 0 } : { palette });
  const parts: Uint8Array[] = [scratch.slice(0, writer.getOutputBufferPosition())];
  let total = parts[0].length + 1;
  for (let f = 0; f < input.frames.length; f++) {
    await yieldToPage(signal);
    indexFrame(input.frames[f].data, indexed, cache, quantiser);
    writer.setOutputBufferPosition(0);
    writer.addFrame(0, 0, width, height, indexed, { delay: input.delaysCs[f] });
    const part = scratch.slice(0, writer.getOutputBufferPosition());
    parts.push(part);
    total += part.length;
    onProgress((f + 1) / input.frames.length);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  out[at] = 0x3b; // trailer
  return out;
}
