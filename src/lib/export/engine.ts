// The export engine: renders the chosen frames (slate first when asked), encodes them as GIF, MP4 or a PNG ZIP, and
// reports progress by stage with an ETA. Cancel with the AbortSignal: encoders stop and the promise rejects with
// CancelledError. Browser only; the page stays usable (rendering and GIF encoding yield between frames, ffmpeg runs in a worker).
import type { RenderLook } from '../render/looks';
import type { PlateFrameSource } from '../plate';
import { rateInfo } from '../timecode';
import { FrameRenderer } from './frames';
import { loadExportFont } from './font';
import { DEFAULT_SLATE_SECONDS, exportFileName, slateFrameCount, ffmpegRate, gifDelays, mp4StartTimecode, zipEntryName, FORMAT_TYPES, type ExportFormat, type ExportLabels } from './layout';
import { ProgressTracker, type ProgressReport } from './progress';
import { frameNeighbours, type ParticleSource } from './source';
import { yieldToPage } from './cancel';

export { CancelledError } from './cancel';

export interface ExportRequest {
  format: ExportFormat;
  labels: ExportLabels;
  /** Inclusive shot frames. */
  first: number;
  last: number;
  width: number;
  height: number;
  look: RenderLook;
  slate: boolean;
  /** How long the slate is held, in seconds (DEFAULT_SLATE_SECONDS when left out). */
  slateSeconds?: number;
  burnIns: boolean;
  /** GIF only: loop forever (true) or play once. */
  loop: boolean;
  /** Motion blur's shutter angle, degrees (src/lib/render/motionBlur.ts); 0 or left out: none. Every format. */
  shutterAngle?: number;
  source: ParticleSource;
  /** Drawn under the splash when given (the "plate underlay" choice). */
  plate: PlateFrameSource | null;
  plateSize: { width: number; height: number } | null;
  metresPerPixel: number | null;
}

export interface ExportResult {
  bytes: Uint8Array;
  contentType: string;
  fileName: string;
  /** Frames in the file, the slate included. */
  frameCount: number;
  seconds: { rendering: number; encoding: number };
}

/** Raw frame bytes a GIF export may hold at once (1.2 GB). */
const GIF_MEMORY_LIMIT = 1.2e9;

const STAGE_WEIGHTS: Record<ExportFormat, { rendering: number; encoding: number }> = {
  gif: { rendering: 0.3, encoding: 0.67 },
  mp4: { rendering: 0.35, encoding: 0.62 },
  zip: { rendering: 0.9, encoding: 0.07 },
  passes: { rendering: 0.9, encoding: 0.07 },
};

/** Runs one export; `onProgress` gets a report after every frame and encoder step. */
export async function runExport(req: ExportRequest, onProgress: (r: ProgressReport) => void, signal: AbortSignal): Promise<ExportResult> {
  const tracker = new ProgressTracker({ preparing: 0.03, ...STAGE_WEIGHTS[req.format], uploading: 0 });
  if (req.format === 'passes') return runPasses(req, tracker, onProgress, signal);
  onProgress(tracker.report('preparing', 0, 'Loading the font'));
  if (req.slate || req.burnIns) await loadExportFont();
  let mp4: typeof import('./mp4') | null = null;
  if (req.format === 'mp4') {
    onProgress(tracker.report('preparing', 0.3, 'Starting the video encoder'));
    mp4 = await import('./mp4');
    await mp4.loadFfmpeg(); // load before rendering so a broken encoder fails fast
  }
  await yieldToPage(signal);

  const renderer = new FrameRenderer({
    width: req.width,
    height: req.height,
    labels: req.labels,
    look: req.look,
    source: req.source,
    plate: req.plate,
    plateSize: req.plateSize,
    metresPerPixel: req.metresPerPixel,
    burnIns: req.burnIns,
    shutterAngle: req.shutterAngle,
  });
  const frames: number[] = [];
  for (let f = req.first; f <= req.last; f++) frames.push(f);
  const fps = rateInfo(req.labels.rateId).fps;
  // the slate is held for the same time in every format: the one slate picture repeated for that many frames
  const slateFrames = req.slate ? slateFrameCount(fps, req.slateSeconds ?? DEFAULT_SLATE_SECONDS) : 0;
  const total = frames.length + slateFrames;

  // gif.js needs every frame as raw RGBA before it starts: refuse what would not fit in a tab's memory.
  if (req.format === 'gif' && req.width * req.height * 4 * total > GIF_MEMORY_LIMIT) {
    throw new Error(`A GIF of ${total} frames at ${req.width}×${req.height} needs more memory than a browser tab has: choose a smaller size or fewer frames, or export an MP4`);
  }
  const images: ImageData[] = [];
  const pngs: { name: string; png: Uint8Array }[] = [];
  const keep = async (name: string) => {
    if (req.format === 'gif') images.push(renderer.imageData());
    else pngs.push({ name, png: await renderer.png() });
  };

  const t0 = performance.now();
  let done = 0;
  if (req.slate) {
    renderer.drawSlate(req.first, req.last);
    if (req.format === 'gif') {
      const slateImage = renderer.imageData();
      for (let i = 0; i < slateFrames; i++) images.push(slateImage);
    } else {
      const slatePng = await renderer.png();
      for (let i = 0; i < slateFrames; i++) pngs.push({ name: zipEntryName(req.labels, 'slate', i), png: slatePng });
    }
    done += slateFrames;
    onProgress(tracker.report('rendering', done / total, `slate, then ${frames.length} frames`));
  }
  for (const f of frames) {
    await yieldToPage(signal);
    await renderer.drawFrame(f);
    await keep(zipEntryName(req.labels, f));
    done++;
    onProgress(tracker.report('rendering', done / total, `frame ${done} of ${total}`));
  }
  const t1 = performance.now();
  await yieldToPage(signal);

  const encodeProgress = (p: number) => onProgress(tracker.report('encoding', p, `${Math.round(p * 100)} %`));
  let bytes: Uint8Array;
  if (req.format === 'gif') {
    const { encodeGif } = await import('./gif');
    bytes = await encodeGif(
      { width: req.width, height: req.height, frames: images, delaysCs: gifDelays(fps, images.length), loop: req.loop },
      encodeProgress,
      signal,
    );
  } else if (req.format === 'mp4') {
    bytes = await mp4!.encodeMp4(
      { frames: pngs.map((p) => p.png), rate: ffmpegRate(req.labels.rateId), startTimecode: mp4StartTimecode(req.labels, req.first, slateFrames) },
      encodeProgress,
      signal,
    );
  } else {
    const { zipFrames } = await import('./zip');
    encodeProgress(0);
    bytes = zipFrames(pngs);
  }
  onProgress(tracker.report('encoding', 1, 'done'));
  const t2 = performance.now();
  return {
    bytes,
    contentType: FORMAT_TYPES[req.format],
    fileName: exportFileName(req.labels, req.first, req.last, req.format),
    frameCount: total,
    seconds: { rendering: (t1 - t0) / 1000, encoding: (t2 - t1) / 1000 },
  };
}

/**
 * The comp passes (passes.ts): every frame's splash with alpha and its liquid matte at the request's size (the panel
 * asks for plate resolution), with no plate, slate or burn-ins: a compositor lays them over the plate themselves.
 */
async function runPasses(req: ExportRequest, tracker: ProgressTracker, onProgress: (r: ProgressReport) => void, signal: AbortSignal): Promise<ExportResult> {
  const [{ LookRenderer }, { layoutView }, passes, blur] = await Promise.all([import('../render/looks'), import('../render/view'), import('./passes'), import('../render/motionBlur')]);
  const h = req.source.header;
  const { toView } = layoutView({
    viewWidth: req.width,
    viewHeight: req.height,
    tankWidth: h.tankWidth,
    tankHeight: h.tankHeight,
    plate: req.plateSize,
    metresPerPixel: req.plateSize ? req.metresPerPixel : null,
  });
  const options = { ...req.source.lookOptions, tank: { width: h.tankWidth, height: h.tankHeight } };
  const looks = new LookRenderer(req.width, req.height);
  const coverage = new Uint8Array(req.width * req.height);
  const fraction = blur.shutterFraction(req.shutterAngle ?? 0);
  const shutter = fraction > 0 ? new blur.ShutterRenderer(looks, req.width, req.height, fraction) : null;
  const files: { name: string; png: Uint8Array }[] = [];
  const total = req.last - req.first + 1;
  const t0 = performance.now();
  for (let f = req.first; f <= req.last; f++) {
    await yieldToPage(signal);
    const particles = await req.source.frameAt(f);
    // with motion blur: the splash over the open shutter first (it estimates the liquid's motion), the matte smeared alike
    const splash = shutter ? shutter.render(req.look, await frameNeighbours(req.source, f, particles), toView, options) : null;
    if (particles.count > 0) passes.liquidCoverage(looks.densityField(particles, toView, options), req.width, req.height, coverage);
    else coverage.fill(0);
    const matte = shutter ? shutter.blurCoverage(coverage, shutter.lastMotion) : coverage;
    files.push({ name: passes.passEntryName(req.labels, 'matte', f), png: passes.encodeMattePng(req.width, req.height, matte) });
    const rgba = passes.straightRgba(splash ?? looks.render(req.look, particles, toView, options));
    files.push({ name: passes.passEntryName(req.labels, 'rgba', f), png: passes.encodeRgbaPng(req.width, req.height, rgba) });
    onProgress(tracker.report('rendering', (f - req.first + 1) / total, `frame ${f - req.first + 1} of ${total}`));
  }
  const t1 = performance.now();
  await yieldToPage(signal);
  onProgress(tracker.report('encoding', 0, 'zipping'));
  const bytes = passes.zipPasses(passes.passesReadme(req.labels, req.first, req.last, req.width, req.height), files);
  onProgress(tracker.report('encoding', 1, 'done'));
  return {
    bytes,
    contentType: FORMAT_TYPES.passes,
    fileName: exportFileName(req.labels, req.first, req.last, 'passes'),
    frameCount: total,
    seconds: { rendering: (t1 - t0) / 1000, encoding: (performance.now() - t1) / 1000 },
  };
}
