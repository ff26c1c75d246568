// A small PNG reader for matte images (W3C PNG Specification, 2nd ed.: chunks, zlib stream, per-row filters 0–4).
// Non-interlaced images of any colour type; 1–16 bits per sample. Returns 8-bit RGBA. Pure TS (fflate for inflate),
// so the same code reads a matte in the browser and in Node tests.
import { unzlibSync } from 'fflate';

export interface RgbaImage { width: number; height: number; data: Uint8Array }

export class PngError extends Error { override name = 'PngError'; }

const SIGNATURE = [137, 80, 78, 71, 13, 10, 26, 10];

/** Decodes PNG bytes into RGBA (8 bits a channel, not premultiplied, rows from the top). Throws PngError. */
export function decodePng(bytes: Uint8Array): RgbaImage {
  if (bytes.length < 8 || SIGNATURE.some((b, i) => bytes[i] !== b)) throw new PngError('not a PNG file');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let pos = 8, width = 0, height = 0, depth = 0, colour = 0, interlace = 0;
  let palette: Uint8Array | null = null, trns: Uint8Array | null = null;
  const idat: Uint8Array[] = [];
  while (pos + 8 <= bytes.length) {
    const len = view.getUint32(pos);
    const type = String.fromCharCode(bytes[pos + 4], bytes[pos + 5], bytes[pos + 6], bytes[pos + 7]);
    const data = bytes.subarray(pos + 8, pos + 8 + len);
    if (type === 'IHDR') {
      width = view.getUint32(pos + 8); height = view.getUint32(pos + 12);
      depth = bytes[pos + 16]; colour = bytes[pos + 17]; interlace = bytes[pos + 20];
    } else if (type === 'PLTE') palette = data;
    else if (type === 'tRNS') trns = data;
    else if (type === 'IDAT') idat.push(data);
    else if (type === 'IEND') break;
    pos += 12 + len;
  }
  if (!width || !height) throw new PngError('PNG has no image header');
  if (width * height > 64_000_000) throw new PngError('PNG is too large for a matte');
  if (interlace) throw new PngError('interlaced PNGs are not supported: save the matte without interlacing');
  const channels = ({ 0: 1, 2: 3, 3: 1, 4: 2, 6: 4 } as Record<number, number>)[colour];
  if (!channels) throw new PngError(`unknown PNG colour type ${colour}`);
  const total = idat.reduce((n, c) => n + c.length, 0);
  const joined = new Uint8Array(total);
  let o = 0;
  for (const c of idat) { joined.set(c, o); o += c.length; }
  let raw: Uint8Array;
  try { raw = unzlibSync(joined); } catch { throw new PngError('PNG image data is damaged'); }

  const bitsPerPixel = channels * depth;
  const stride = Math.ceil((width * bitsPerPixel) / 8);
  const bpp = Math.max(1, bitsPerPixel >> 3); // bytes per complete pixel for the filters
  if (raw.length < (stride + 1) * height) throw new PngError('PNG image data is too short');
  const rows = new Uint8Array(stride * height);
  const prev = new Uint8Array(stride);
  for (let y = 0; y < height; y++) {
    const filter = raw[y * (stride + 1)];
    const line = raw.subarray(y * (stride + 1) + 1, (y + 1) * (stride + 1));
    const out = rows.subarray(y * stride, (y + 1) * stride);
    for (let i = 0; i < stride; i++) {
      const a = i >= bpp ? out[i - bpp] : 0, b = prev[i], c = i >= bpp ? prev[i - bpp] : 0;
      let v = line[i];
      switch (filter) {
        case 0: break;
        case 1: v += a; break;
        case 2: v += b; break;
        case 3: v += (a + b) >> 1; break;
        case 4: { // Paeth predictor
          const p = a + b - c, pa = Math.abs(p - a), pb = Math.abs(p - b), pc = Math.abs(p - c);
          v += pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
          break;
        }
        default: throw new PngError(`unknown PNG row filter ${filter}`);
      }
      out[i] = v & 255;
    }
    prev.set(out);
  }

  // Samples → RGBA.
  const sample = (row: number, index: number): number => {
    const base = row * stride;
    if (depth === 8) return rows[base + index];
    if (depth === 16) return rows[base + index * 2];
    const perByte = 8 / depth;
    const byte = rows[base + Math.floor(index / perByte)];
    const shift = 8 - depth * ((index % perByte) + 1);
    const v = (byte >> shift) & ((1 << depth) - 1);
    return colour === 3 ? v : Math.round((v * 255) / ((1 << depth) - 1));
  };
  const data = new Uint8Array(width * height * 4);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const d = (y * width + x) * 4;
      if (colour === 0 || colour === 4) {
        const g = sample(y, x * channels);
        data[d] = data[d + 1] = data[d + 2] = g;
        data[d + 3] = colour === 4 ? sample(y, x * channels + 1) : 255;
      } else if (colour === 2 || colour === 6) {
        data[d] = sample(y, x * channels); data[d + 1] = sample(y, x * channels + 1); data[d + 2] = sample(y, x * channels + 2);
        data[d + 3] = colour === 6 ? sample(y, x * channels + 3) : 255;
      } else {
        const k = sample(y, x);
        if (!palette || k * 3 + 2 >= palette.length) throw new PngError('PNG palette index out of range');
        data[d] = palette[k * 3]; data[d + 1] = palette[k * 3 + 1]; data[d + 2] = palette[k * 3 + 2];
        data[d + 3] = trns && k < trns.length ? trns[k] : 255;
      }
    }
  }
  return { width, height, data };
}
