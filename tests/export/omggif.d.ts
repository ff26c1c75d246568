// Types for omggif (the package ships none): the reader the tests use.
declare module 'omggif' {
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
