// An RGBA image in memory (premultiplied alpha, 8 bits a channel): what the render looks draw particles into.

export interface PixelImage {
  width: number;
  height: number;
  /** RGBA bytes, row-major from the top-left, premultiplied by alpha. */
  data: Uint8Array;
  /** The same bytes as one 32-bit word a pixel (little-endian: 0xAABBGGRR). */
  pixels: Uint32Array;
}

export function createImage(width: number, height: number): PixelImage {
  const w = Math.max(1, Math.round(width));
  const h = Math.max(1, Math.round(height));
  const buffer = new ArrayBuffer(w * h * 4);
  return { width: w, height: h, data: new Uint8Array(buffer), pixels: new Uint32Array(buffer) };
}

/** Packs a colour (0–255 channels, alpha 0–1) as a premultiplied 0xAABBGGRR word. */
export function packPremultiplied(r: number, g: number, b: number, alpha: number): number {
  const a = Math.max(0, Math.min(1, alpha));
  return (((Math.round(a * 255) << 24) | (Math.round(b * a) << 16) | (Math.round(g * a) << 8) | Math.round(r * a)) >>> 0);
}

/** Linear interpolation between colour stops at positions 0…1; returns [r, g, b] in 0–255. */
export function rampColour(stops: readonly (readonly [number, number, number, number])[], t: number): [number, number, number] {
  const u = Math.max(0, Math.min(1, t));
  for (let i = 1; i < stops.length; i++) {
    const [p1, r1, g1, b1] = stops[i];
    if (u <= p1) {
      const [p0, r0, g0, b0] = stops[i - 1];
      const f = p1 > p0 ? (u - p0) / (p1 - p0) : 0;
      return [r0 + (r1 - r0) * f, g0 + (g1 - g0) * f, b0 + (b1 - b0) * f];
    }
  }
  const last = stops[stops.length - 1];
  return [last[1], last[2], last[3]];
}
