// MP4 (H.264, yuv420p) from PNG frames with ffmpeg.wasm: the single-thread core served by us (no COOP/COEP needed),
// loaded once per page and kept; cancel terminates its worker (the next export loads a fresh one).
import { FFmpeg } from '@ffmpeg/ffmpeg';
import coreURL from '@ffmpeg/core?url';
import wasmURL from '@ffmpeg/core/wasm?url';
import { CancelledError } from './cancel';
import { mp4Args } from './layout';

const LOAD_TIMEOUT_MS = 90_000;

let loaded: Promise<FFmpeg> | null = null;

/** Returns a loaded ffmpeg (a hung load is refused after 90 s instead of waiting forever: PITFALLS.md). */
export function loadFfmpeg(): Promise<FFmpeg> {
  loaded ??= (async () => {
    const ffmpeg = new FFmpeg();
    let timer: ReturnType<typeof setTimeout> | undefined;
    try {
      await Promise.race([
        ffmpeg.load({ coreURL, wasmURL }),
        new Promise<never>((_, reject) => {
          timer = setTimeout(() => reject(new Error('The video encoder did not start within 90 s: reload the page and try again')), LOAD_TIMEOUT_MS);
        }),
      ]);
    } catch (err) {
      ffmpeg.terminate();
      throw err;
    } finally {
      clearTimeout(timer);
    }
    return ffmpeg;
  })();
  loaded.catch(() => (loaded = null));
  return loaded;
}

export interface Mp4Input {
  /** PNG frames in order. */
  frames: Uint8Array[];
  /** ffmpeg rate expression, e.g. '24' or '24000/1001' (ffmpegRate()). */
  rate: string;
  /** Source timecode of the first picture, written as the MP4's timecode track (mp4StartTimecode()). */
  startTimecode?: string;
}

/** Encodes the frames; resolves to the MP4 bytes. Aborting the signal terminates ffmpeg's worker. */
export async function encodeMp4(input: Mp4Input, onProgress: (fraction: number) => void, signal: AbortSignal): Promise<Uint8Array> {
  if (signal.aborted) throw new CancelledError();
  const ffmpeg = await loadFfmpeg();
  const onAbort = () => {
    ffmpeg.terminate();
    loaded = null;
  };
  signal.addEventListener('abort', onAbort, { once: true });
  const total = input.frames.length;
  const onLog = ({ message }: { message: string }) => {
    const m = /frame=\s*(\d+)/.exec(message);
    if (m) onProgress(Math.min(1, Number(m[1]) / total));
  };
  ffmpeg.on('log', onLog);
  const names = input.frames.map((_, i) => `frame${String(i).padStart(5, '0')}.png`);
  try {
    // writeFile transfers its buffer to ffmpeg's worker (detaching it here), and a held slate is one picture listed
    // once per frame it holds: each write sends its own copy.
    for (let i = 0; i < total; i++) await ffmpeg.writeFile(names[i], input.frames[i].slice());
    const code = await ffmpeg.exec(mp4Args(input.rate, input.startTimecode));
    if (signal.aborted) throw new CancelledError();
    if (code !== 0) throw new Error(`The video encoder failed (exit code ${code})`);
    const out = await ffmpeg.readFile('out.mp4');
    onProgress(1);
    return out as Uint8Array;
  } catch (err) {
    if (signal.aborted) throw new CancelledError();
    throw err;
  } finally {
    signal.removeEventListener('abort', onAbort);
    if (!signal.aborted) {
      ffmpeg.off('log', onLog);
      for (const n of [...names, 'out.mp4']) await ffmpeg.deleteFile(n).catch(() => undefined);
    }
  }
}
