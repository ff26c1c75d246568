// Transparency read from a picture's header (src/lib/server/picture-header.ts), for each way PNG and WebP declare it.
// Byte layouts: PNG, ISO/IEC 15948:2003 §5.3 (chunk = length, type, data, CRC), §11.2.2 (IHDR colour types),
// §11.3.2.1 (tRNS); WebP, Google's "WebP Container Specification" (RIFF, VP8X flags) and "WebP Lossless Bitstream
// Specification" (VP8L header), both also in RFC 9649. Section numbers and bit positions from memory. CRCs are left
// zero: the reader does not check them.
import { describe, it, expect } from 'vitest';
import { declaresAlpha } from '../../src/lib/server/picture-header';

const chunk = (type: string, data: number[] = []) => {
  const b = Buffer.alloc(12 + data.length);
  b.writeUInt32BE(data.length, 0);
  b.write(type, 4, 'ascii');
  Buffer.from(data).copy(b, 8);
  return b;
};
const ihdr = (colourType: number) => chunk('IHDR', [0, 0, 0, 8, 0, 0, 0, 8, 8, colourType, 0, 0, 0]);
const png = (...chunks: Buffer[]) => new Uint8Array(Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), ...chunks]));

function riff(fourcc: string, payload: number[]): Uint8Array {
  const b = Buffer.alloc(20 + payload.length);
  b.write('RIFF', 0, 'ascii');
  b.writeUInt32LE(12 + payload.length, 4);
  b.write('WEBP', 8, 'ascii');
  b.write(fourcc, 12, 'ascii');
  b.writeUInt32LE(payload.length, 16);
  Buffer.from(payload).copy(b, 20);
  return new Uint8Array(b);
}

describe('declaresAlpha', () => {
  it('reads PNG colour types 4 and 6 as alpha, 0, 2 and 3 only with a tRNS chunk before the image data', () => {
    expect(declaresAlpha(png(ihdr(6), chunk('IDAT'), chunk('IEND')))).toBe(true);
    expect(declaresAlpha(png(ihdr(4), chunk('IDAT'), chunk('IEND')))).toBe(true);
    expect(declaresAlpha(png(ihdr(2), chunk('IDAT'), chunk('IEND')))).toBe(false);
    expect(declaresAlpha(png(ihdr(0), chunk('IDAT'), chunk('IEND')))).toBe(false);
    expect(declaresAlpha(png(ihdr(3), chunk('PLTE', [0, 0, 0, 255, 255, 255]), chunk('tRNS', [0]), chunk('IDAT'), chunk('IEND')))).toBe(true);
    expect(declaresAlpha(png(ihdr(3), chunk('PLTE', [0, 0, 0, 255, 255, 255]), chunk('IDAT'), chunk('tRNS', [0]), chunk('IEND')))).toBe(false);
  });

  it('reads the VP8X alpha flag and the VP8L alpha_is_used bit; a lossy VP8 file has none', () => {
    const vp8x = (flags: number) => riff('VP8X', [flags, 0, 0, 0, 7, 0, 0, 7, 0, 0]);
    expect(declaresAlpha(vp8x(0x10))).toBe(true);
    expect(declaresAlpha(vp8x(0x08))).toBe(false); // the EXIF flag alone
    const vp8l = (alpha: boolean) => {
      const bits = (7 | (7 << 14) | ((alpha ? 1 : 0) << 28)) >>> 0;
      return riff('VP8L', [0x2f, bits & 255, (bits >>> 8) & 255, (bits >>> 16) & 255, bits >>> 24, 0, 0, 0, 0, 0]);
    };
    expect(declaresAlpha(vp8l(true))).toBe(true);
    expect(declaresAlpha(vp8l(false))).toBe(false);
    expect(declaresAlpha(riff('VP8 ', [0x9d, 0x01, 0x2a, 8, 0, 8, 0, 0, 0, 0]))).toBe(false);
  });

  it('answers null for anything else', () => {
    expect(declaresAlpha(new Uint8Array([0xff, 0xd8, 0xff, 0xe0, ...new Array(40).fill(0)]))).toBeNull();
    expect(declaresAlpha(new Uint8Array(0))).toBeNull();
  });
});
