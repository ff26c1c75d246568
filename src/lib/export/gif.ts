// Animated GIF from rendered frames with gif.js (its worker script served by us), per-frame delays from gifDelays(),
// and the trailing zero bytes gif.js leaves after the trailer removed.
import GIF from 'gif.js';
import workerScript from 'gif.js/dist/gif.worker.js?url';
import { trimGifPadding } from './layout';
import { CancelledError } from './cancel';

export interface GifInput {
  width: number;
  height: number;
  frames: ImageData[];
  /** Per frame, hundredths of a second. */
  delaysCs: number[];
  loop: boolean;
  /** Encoder threads (Web Workers). */
  workers?: number;
}

/** Encodes the frames; resolves to the GIF bytes. Aborting the signal terminates the workers. */
export function encodeGif(input: GifInput, onProgress: (fraction: number) => void, signal: AbortSignal): Promise<Uint8Array> {
  return new Promise((resolve, reject) => {
    if (signal.aborted) return reject(new CancelledError());
    const gif = new GIF({
      workers: input.workers ?? Math.max(1, Math.min(4, (navigator.hardwareConcurrency || 2) - 0)),
      quality: 10,
      workerScript,
      width: input.width,
      height: input.height,
      repeat: input.loop ? 0 : -1,
      background: '#000000',
    });
    // gif.js takes the delay in milliseconds and stores round(ms / 10) centiseconds: hand it whole centiseconds.
    input.frames.forEach((frame, i) => gif.addFrame(frame, { delay: input.delaysCs[i] * 10 }));
    const onAbort = () => {
      gif.abort();
      reject(new CancelledError());
    };
    signal.addEventListener('abort', onAbort, { once: true });
    gif.on('progress', (p) => onProgress(p));
    gif.on('finished', async (blob) => {
      signal.removeEventListener('abort', onAbort);
      resolve(trimGifPadding(new Uint8Array(await blob.arrayBuffer())).slice());
    });
    gif.render();
  });
}
