// Export benchmark: bakes 96 frames of the reference dam break into a clip in Node, then exports it in headless
// Chromium (Debian's, flags as in tests/support/browser.ts) as GIF and MP4 at 960×540 with burn-ins, the way the
// Export panel does (one NeuQuant palette + omggif on the page, ffmpeg.wasm single-thread core). Prints figures, then one JSON line.
import { build } from 'vite';
import { chromium } from 'playwright-core';
import { mkdtempSync, readFileSync, rmSync, existsSync } from 'node:fs';
import { tmpdir, cpus } from 'node:os';
import path from 'node:path';
import { createSolver } from '../lib/sim/solver';
import { referenceDamBreak } from '../lib/sim/reference';
import { ClipWriter } from '../lib/clip/encode';
import { projectRoot as root } from './services';

const FRAMES = 96;
const WIDTH = 960;
const HEIGHT = 540;
const ORIGIN = 'http://127.0.0.1:9999'; // never contacted: every request is answered by a Playwright route
const BASE = '/__bench/';
/** Motion blur's shutter angle for every export of the run (degrees; BENCH_EXPORT_SHUTTER=180, default 0: none). */
const SHUTTER = Number(process.env.BENCH_EXPORT_SHUTTER ?? 0);

function bakeClip(): { bytes: Uint8Array; particles: number; seconds: number } {
  const t = performance.now();
  const setup = referenceDamBreak(1);
  const scene = setup.scene;
  const sim = createSolver(scene, setup.options);
  const startFrame = scene.timing.startFrame;
  const endFrame = Math.min(scene.timing.endFrame, startFrame + FRAMES - 1);
  const writer = new ClipWriter({ startFrame, endFrame, fps: 24, tankWidth: scene.tank.width, tankHeight: scene.tank.height, particleCapacity: sim.capacity, solverBuild: 'bench', sceneHash: 'bench' });
  for (let f = startFrame; f <= endFrame; f++) {
    if (f > startFrame) sim.stepFrame();
    writer.addFrame(sim.count, sim.x, sim.y, sim.u, sim.v);
  }
  return { bytes: writer.finish(), particles: sim.count, seconds: (performance.now() - t) / 1000 };
}

async function bundle(outDir: string) {
  await build({
    configFile: false,
    root,
    base: BASE,
    logLevel: 'warn',
    resolve: { alias: { '~': path.join(root, 'src') } },
    worker: { format: 'es' },
    build: {
      outDir,
      emptyOutDir: true,
      target: 'es2022',
      assetsInlineLimit: 0,
      copyPublicDir: false,
      rollupOptions: { input: path.join(root, 'src/lib/export/bench-entry.ts'), output: { entryFileNames: 'entry.js' } },
    },
  });
}

const TYPES: Record<string, string> = { '.js': 'text/javascript', '.wasm': 'application/wasm', '.woff2': 'font/woff2' };

async function main() {
  console.log(`baking ${FRAMES} frames of the reference dam break…`);
  const clip = bakeClip();
  console.log(`  ${clip.particles} particles, clip ${(clip.bytes.length / 1e6).toFixed(1)} MB, baked in ${clip.seconds.toFixed(1)} s`);
  const dir = mkdtempSync(path.join(tmpdir(), 'tidemark-bench-export-'));
  const profile = mkdtempSync(path.join(tmpdir(), 'tidemark-chromium-'));
  let context: Awaited<ReturnType<typeof chromium.launchPersistentContext>> | null = null;
  try {
    await bundle(dir);
    context = await chromium.launchPersistentContext(profile, {
      executablePath: '/usr/bin/chromium',
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    await context.route(`${ORIGIN}/**`, async (route) => {
      const rel = new URL(route.request().url()).pathname.slice(BASE.length);
      if (rel === '' || rel === 'index.html')
        return route.fulfill({ contentType: 'text/html', body: `<!doctype html><meta charset="utf-8"><body><script type="module" src="${BASE}entry.js"></script></body>` });
      if (rel === 'clip.bin') return route.fulfill({ contentType: 'application/octet-stream', body: Buffer.from(clip.bytes) });
      const file = path.join(dir, rel);
      if (!file.startsWith(dir) || !existsSync(file)) return route.fulfill({ status: 404, body: '' });
      return route.fulfill({ contentType: TYPES[path.extname(file)] ?? 'application/octet-stream', body: readFileSync(file) });
    });
    const page = context.pages()[0] ?? (await context.newPage());
    await page.goto(`${ORIGIN}${BASE}index.html`);
    await page.waitForFunction(() => typeof window.tidemarkExportBench === 'function');
    const results: Record<string, unknown>[] = [];
    for (const format of ['gif', 'mp4', 'passes'] as const) {
      const r = await page.evaluate((o) => window.tidemarkExportBench(o), { format, width: WIDTH, height: HEIGHT, frames: FRAMES, look: 'surface' as const, shutterAngle: SHUTTER });
      console.log(
        `${format === 'passes' ? 'Comp passes ZIP' : format.toUpperCase()}${SHUTTER > 0 ? ` (${SHUTTER}° motion blur)` : ''}: ${r.frameCount} frames ${WIDTH}×${HEIGHT} in ${r.totalSeconds.toFixed(1)} s ` +
          `(rendering ${r.renderingSeconds.toFixed(1)} s = ${((r.renderingSeconds * 1000) / r.frameCount).toFixed(0)} ms/frame, encoding ${r.encodingSeconds.toFixed(1)} s), ` +
          `${(r.bytes / 1e6).toFixed(2)} MB; font and encoder start-up ${(r.totalSeconds - r.renderingSeconds - r.encodingSeconds).toFixed(1)} s`,
      );
      results.push(r);
    }
    await context.close();
    console.log(JSON.stringify({ bench: 'export', shutterAngle: SHUTTER, frames: FRAMES, width: WIDTH, height: HEIGHT, cores: cpus().length, particles: clip.particles, results }));
  } finally {
    await context?.close().catch(() => undefined); // a failed export leaves the browser writing to its profile
    rmSync(dir, { recursive: true, force: true });
    rmSync(profile, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
