// Types for omggif (the package ships none): the writer the GIF export uses and the reader the tests use.
declare module 'omggif' {
  export class GifWriter {
    /** Writes the header, the global palette (0xRRGGBB numbers, a power of two of them) and, with `loop`, the loop block. */
    constructor(buf: Uint8Array, width: number, height: number, options?: { palette?: number[]; loop?: number; background?: number });
    /** Writes one frame of palette indices; `delay` in hundredths of a second. Returns the position after it. */
    addFrame(x: number, y: number, w: number, h: number, indexedPixels: Uint8Array, options?: { delay?: number; palette?: number[]; disposal?: number; transparent?: number }): number;
    end(): number;
    getOutputBufferPosition(): number;
    setOutputBufferPosition(p: number): void;
  }
  export class GifReader {
    constructor(buf: Uint8Array);
    width: number;
    height: number;
    numFrames(): number;
    loopCount(): number | null;
    frameInfo(i: number): { x: number; y: number; width: number; height: number; delay: number; disposal: number };
    decodeAndBlitFrameRGBA(i: number, pixels: Uint8Array | Uint8ClampedArray): void;
  }
}
