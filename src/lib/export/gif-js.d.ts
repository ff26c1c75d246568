// Types for gif.js 0.2.0 (the package ships none): the parts the export uses.
declare module 'gif.js' {
  interface GifOptions {
    workers?: number;
    quality?: number;
    workerScript?: string;
    width?: number;
    height?: number;
    /** 0 loops forever, -1 plays once (no NETSCAPE2.0 block). */
    repeat?: number;
    background?: string;
    dither?: boolean | string;
    transparent?: number | null;
    debug?: boolean;
  }
  export default class GIF {
    constructor(options: GifOptions);
    /** `delay` in milliseconds (stored as round(delay / 10) hundredths of a second). */
    addFrame(image: ImageData | CanvasRenderingContext2D | HTMLCanvasElement, options?: { delay?: number; copy?: boolean }): void;
    on(event: 'progress', cb: (fraction: number) => void): void;
    on(event: 'finished', cb: (blob: Blob, data: Uint8Array) => void): void;
    on(event: 'abort' | 'start', cb: () => void): void;
    render(): void;
    abort(): void;
    running: boolean;
  }
}
