// Shot thumbnails made on the server from still plates, in plain JavaScript (no native image library): PNG is decoded
// with pngjs and JPEG with jpeg-js, the picture is resampled to 320 px wide by area averaging (each thumbnail pixel is
// the coverage-weighted mean of the plate pixels under it; aspect kept) and encoded as PNG. WebP and video plates
// cannot be decoded here: the browser draws their first frame and uploads it as a thumbnail instead.
import pngjs from 'pngjs';
import jpeg from 'jpeg-js';
import { encodePng } from './png';

/** Thumbnail width in pixels; the height follows the plate's aspect. */
export const THUMBNAIL_WIDTH = 320;
/** Largest still decoded on the server (pixels): 40 MP in RGBA is 160 MB. Larger ones get a browser-made thumbnail. */
export const MAX_DECODE_PIXELS = 40_000_000;
/** Plate types whose thumbnail the server makes. */
export const SERVER_THUMBNAIL_TYPES = ['image/png', 'image/jpeg'] as const;

export const canThumbnailOnServer = (contentType: string) => (SERVER_THUMBNAIL_TYPES as readonly string[]).includes(contentType);

/** Size of the thumbnail of a width × height picture: 320 wide, height rounded, at least 1. */
export function thumbnailSize(width: number, height: number): { width: number; height: number } {
  return {
    width: THUMBNAIL_WIDTH,
    height: Math.max(1, Math.round((THUMBNAIL_WIDTH * height) / width)),
  };
}

export interface Rgba {
  width: number;
  height: number;
  /** 8-bit RGBA, rows top to bottom. */
  data: Uint8Array;
}

/** Decodes a PNG or JPEG into 8-bit RGBA. Throws on damaged data or a picture above MAX_DECODE_PIXELS. */
export function decodeStill(bytes: Uint8Array, contentType: string): Rgba {
  const buf = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (contentType === 'image/png') {
    // Refuse before inflating: pngjs has no size limit of its own. IHDR width and height are at bytes 16..23.
    if (buf.length >= 24 && buf.readUInt32BE(16) * buf.readUInt32BE(20) > MAX_DECODE_PIXELS) throw new Error('PNG too large to decode on the server');
    const png = pngjs.PNG.sync.read(buf); // any colour type and bit depth, interlaced too; 16-bit scaled to 8
    return {
      width: png.width,
      height: png.height,
      data: new Uint8Array(png.data.buffer, png.data.byteOffset, png.data.byteLength),
    };
  }
  if (contentType === 'image/jpeg') {
    const img = jpeg.decode(buf, {
      useTArray: true,
      formatAsRGBA: true,
      maxResolutionInMP: MAX_DECODE_PIXELS / 1e6,
      maxMemoryUsageInMB: 512,
    });
    return { width: img.width, height: img.height, data: img.data };
  }
  throw new Error(`cannot decode ${contentType} on the server`);
}

/** For one axis: which source pixels each of `dst` output pixels covers, and how much (weights sum to 1). */
function coverage(
  src: number,
  dst: number,
): {
  first: Int32Array;
  count: Int32Array;
  weights: Float32Array;
  stride: number;
} {
  const scale = src / dst;
  const stride = Math.ceil(scale) + 2;
  const first = new Int32Array(dst);
  const count = new Int32Array(dst);
  const weights = new Float32Array(dst * stride);
  for (let i = 0; i < dst; i++) {
    const a = i * scale;
    const b = Math.min(src, (i + 1) * scale);
    const j0 = Math.floor(a);
    const j1 = Math.min(src, Math.ceil(b));
    first[i] = j0;
    count[i] = j1 - j0;
    for (let j = j0; j < j1; j++) weights[i * stride + (j - j0)] = (Math.min(b, j + 1) - Math.max(a, j)) / (b - a);
  }
  return { first, count, weights, stride };
}

/**
 * Resamples RGBA to RGB of `width` × `height` by area averaging (a box filter with fractional edges; for a larger
 * output each pixel takes the source pixel under it). Transparent pixels are laid over `background` first.
 */
export function resampleArea(img: Rgba, width: number, height: number, background: [number, number, number] = [255, 255, 255]): Uint8Array {
  const { width: sw, height: sh, data } = img;
  const cx = coverage(sw, width);
  const cy = coverage(sh, height);
  // Pass 1: every source row to `width` columns (floats, RGB over the background).
  const rows = new Float32Array(sh * width * 3);
  for (let y = 0; y < sh; y++) {
    const rowIn = y * sw * 4;
    const rowOut = y * width * 3;
    for (let x = 0; x < width; x++) {
      let r = 0;
      let g = 0;
      let b = 0;
      const j0 = cx.first[x];
      for (let k = 0; k < cx.count[x]; k++) {
        const w = cx.weights[x * cx.stride + k];
        const p = rowIn + (j0 + k) * 4;
        const a = data[p + 3] / 255;
        r += w * (data[p] * a + background[0] * (1 - a));
        g += w * (data[p + 1] * a + background[1] * (1 - a));
        b += w * (data[p + 2] * a + background[2] * (1 - a));
      }
      rows[rowOut + x * 3] = r;
      rows[rowOut + x * 3 + 1] = g;
      rows[rowOut + x * 3 + 2] = b;
    }
  }
  // Pass 2: columns to `height` rows.
  const out = new Uint8Array(width * height * 3);
  const acc = new Float32Array(width * 3);
  for (let y = 0; y < height; y++) {
    acc.fill(0);
    const j0 = cy.first[y];
    for (let k = 0; k < cy.count[y]; k++) {
      const w = cy.weights[y * cy.stride + k];
      const row = (j0 + k) * width * 3;
      for (let i = 0; i < width * 3; i++) acc[i] += w * rows[row + i];
    }
    for (let i = 0; i < width * 3; i++) out[y * width * 3 + i] = Math.max(0, Math.min(255, Math.round(acc[i])));
  }
  return out;
}

/** Makes the PNG thumbnail of a PNG or JPEG plate (320 px wide, aspect kept). Throws when it cannot be decoded. */
export function makeStillThumbnail(bytes: Uint8Array, contentType: string): { png: Uint8Array; width: number; height: number } {
  const img = decodeStill(bytes, contentType);
  if (!img.width || !img.height) throw new Error('picture has no pixels');
  const size = thumbnailSize(img.width, img.height);
  return {
    png: encodePng(size.width, size.height, resampleArea(img, size.width, size.height)),
    ...size,
  };
}
