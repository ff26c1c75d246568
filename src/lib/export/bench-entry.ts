// Browser entry of `npm run bench` (src/cli/bench-export.ts): exports a clip served at ./clip.bin as GIF, MP4 and comp passes, with
// slate and burn-ins, and returns the timings. Not part of the app bundle.
import { ClipReader } from '../clip/decode';
import { runExport } from './engine';
import type { ExportFormat, ExportLabels } from './layout';
import type { ParticleSource } from './source';

declare global {
  interface Window {
    tidemarkExportBench: (o: { format: ExportFormat; width: number; height: number; frames: number; look: 'surface' | 'speed'; shutterAngle?: number }) => Promise<{
      format: ExportFormat;
      totalSeconds: number;
      renderingSeconds: number;
      encodingSeconds: number;
      bytes: number;
      frameCount: number;
      particles: number;
    }>;
  }
}

let source: Promise<ParticleSource> | null = null;

function openSource(): Promise<ParticleSource> {
  source ??= (async () => {
    const bytes = new Uint8Array(await (await fetch('./clip.bin')).arrayBuffer());
    const reader = await ClipReader.fromBytes(bytes, 1000);
    return { header: reader.header, lookOptions: {}, frameAt: (f: number) => reader.frameAt(f) };
  })();
  return source;
}

window.tidemarkExportBench = async ({ format, width, height, frames, look, shutterAngle }) => {
  const src = await openSource();
  const first = src.header.startFrame;
  const last = Math.min(src.header.endFrame, first + frames - 1);
  const labels: ExportLabels = {
    studioName: 'Bench Studio',
    showName: 'Benchmark',
    showCode: 'BN',
    shotCode: 'BN_010',
    versionNumber: 1,
    artistName: 'Bench',
    date: new Date().toISOString().slice(0, 10),
    reviewState: 'draft',
    rateId: '24',
    cutIn: first,
    sourceTimecodeIn: '01:00:00:00',
  };
  const t0 = performance.now();
  const result = await runExport(
    { format, labels, first, last, width, height, look, slate: false, burnIns: true, loop: true, shutterAngle, source: src, plate: null, plateSize: null, metresPerPixel: null },
    () => undefined,
    new AbortController().signal,
  );
  const mid = await src.frameAt(Math.round((first + last) / 2));
  return {
    format,
    totalSeconds: (performance.now() - t0) / 1000,
    renderingSeconds: result.seconds.rendering,
    encodingSeconds: result.seconds.encoding,
    bytes: result.bytes.byteLength,
    frameCount: result.frameCount,
    particles: mid.count,
  };
};
