// Matte tracing: a white disc drawn in a PNG (encoded here, decoded by our reader) becomes a polygon whose area is within
// 2 % of the disc's area πr² (area of a circle, Archimedes, Measurement of a Circle); the brush's masks trace the same way.
import { describe, it, expect } from 'vitest';
import { encodePng } from '../../src/lib/server/demo-plates';
import { deflateSync } from 'node:zlib';
import { decodePng } from '../../src/lib/editor/png';
import { maskFromImage, traceMatte, traceOutlines } from '../../src/lib/editor/matte';
import { polygonSignedArea } from '../../src/lib/scene/shapes';
import { parseScene } from '../../src/lib/scene/schema';
import { startingScene } from '../../src/lib/editor/document';

function discPng(w: number, h: number, cx: number, cy: number, r: number): Uint8Array {
  const rgb = new Uint8Array(w * h * 3);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
    const inside = (x + 0.5 - cx) ** 2 + (y + 0.5 - cy) ** 2 <= r * r;
    rgb.fill(inside ? 255 : 0, (y * w + x) * 3, (y * w + x) * 3 + 3);
  }
  return encodePng(w, h, rgb);
}

describe('matte tracing', () => {
  it('decodes our own PNG encoder’s output', () => {
    const img = decodePng(discPng(40, 30, 20, 15, 10));
    expect([img.width, img.height]).toEqual([40, 30]);
    expect(Array.from(img.data.subarray(0, 4))).toEqual([0, 0, 0, 255]);
    const centre = (15 * 40 + 20) * 4;
    expect(Array.from(img.data.subarray(centre, centre + 4))).toEqual([255, 255, 255, 255]);
  });

  it('decodes a PNG with Sub, Up, Average and Paeth row filters (grey + alpha)', () => {
    const w = 5, h = 4;
    const px = (x: number, y: number) => [(x * 40 + y * 7) & 255, 200 - x * 10];
    const raw: number[] = [];
    const rows: number[][] = [];
    for (let y = 0; y < h; y++) rows.push(Array.from({ length: w }, (_, x) => px(x, y)).flat());
    for (let y = 0; y < h; y++) {
      const f = y % 4 + 1; // filters 1..4
      raw.push(f);
      const cur = rows[y], up = y ? rows[y - 1] : new Array(w * 2).fill(0);
      for (let i = 0; i < w * 2; i++) {
        const a = i >= 2 ? cur[i - 2] : 0, b = up[i], c = i >= 2 ? up[i - 2] : 0;
        const p = a + b - c, pa = Math.abs(p - a), pb = Math.abs(p - b), pc = Math.abs(p - c);
        const pred = f === 1 ? a : f === 2 ? b : f === 3 ? (a + b) >> 1 : pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
        raw.push((cur[i] - pred) & 255);
      }
    }
    const chunk = (type: string, data: Buffer) => {
      const len = Buffer.alloc(4); len.writeUInt32BE(data.length);
      return Buffer.concat([len, Buffer.from(type), data, Buffer.alloc(4)]); // CRC not checked by the reader
    };
    const ihdr = Buffer.alloc(13); ihdr.writeUInt32BE(w, 0); ihdr.writeUInt32BE(h, 4); ihdr[8] = 8; ihdr[9] = 4;
    const png = Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(Buffer.from(raw))), chunk('IEND', Buffer.alloc(0))]);
    const img = decodePng(png);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
      const d = (y * w + x) * 4;
      expect([img.data[d], img.data[d + 3]]).toEqual(px(x, y));
    }
  });

  for (const r of [40, 100, 180]) {
    it(`a disc of radius ${r} px traces to a polygon within 2 % of πr²`, () => {
      const w = Math.ceil(2 * r + 60), h = Math.ceil(2 * r + 40);
      const mask = maskFromImage(decodePng(discPng(w, h, w / 2, h / 2, r)));
      const mpp = 0.002; // 2 mm per pixel
      const poly = traceMatte(mask, { metresPerPixel: mpp, originX: 0, originY: 0 })!;
      expect(poly.length).toBeGreaterThan(8);
      expect(poly.length).toBeLessThanOrEqual(400);
      const area = Math.abs(polygonSignedArea(poly));
      const expected = Math.PI * (r * mpp) ** 2; // A = πr²
      expect(Math.abs(area - expected) / expected).toBeLessThan(0.02);
      // centred where the disc was drawn (y flipped: rows run down, metres run up)
      const cx = poly.reduce((s, p) => s + p[0], 0) / poly.length, cy = poly.reduce((s, p) => s + p[1], 0) / poly.length;
      expect(cx).toBeCloseTo((w / 2) * mpp, 2);
      expect(cy).toBeCloseTo((h / 2) * mpp, 2);
      // and it is a valid wall in a scene
      const doc = startingScene({ firstFrame: 1, lastFrame: 10, frameRate: '24', plateWidth: w, plateHeight: h, metresPerPixel: mpp });
      expect(parseScene({ ...doc, walls: [{ id: 'rock', shape: { type: 'polygon', points: poly } }] }).ok).toBe(true);
    });
  }

  it('keeps the largest outline and ignores specks; an empty matte gives null', () => {
    const w = 120, h = 80;
    const data = new Uint8Array(w * h);
    for (let y = 10; y < 60; y++) for (let x = 10; x < 90; x++) data[y * w + x] = 1;
    data[70 * w + 110] = 1; // a speck
    expect(traceOutlines({ width: w, height: h, data })).toHaveLength(2);
    const poly = traceMatte({ width: w, height: h, data }, { metresPerPixel: 1, originX: 0, originY: 0 })!;
    // 80 × 50 px less the ⅛ px² marching squares cuts at each corner, and what simplification (≤ 0.6 px) shaves off
    expect(Math.abs(Math.abs(polygonSignedArea(poly)) - 4000) / 4000).toBeLessThan(0.02);
    expect(traceMatte({ width: 4, height: 4, data: new Uint8Array(16) }, { metresPerPixel: 1, originX: 0, originY: 0 })).toBeNull();
  });
});
