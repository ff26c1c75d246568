// Live preview benchmark: frames per second of the editor's preview Web Worker (src/lib/editor/preview.worker.ts, the
// real solver) in headless Chromium, for a 96 × 54-cell and a 192 × 108-cell tank holding a typical blocking scene
// (a pool, a dam of liquid, a wall and a falling prop). The worker and a page script are bundled with esbuild and
// served from a local HTTP origin; the page also draws every frame with the editor's look (speed dots, 960 × 540) and
// counts requestAnimationFrame ticks to show the page stays responsive. Prints figures, then a JSON line.
// Run: npx tsx src/cli/bench-preview.ts   (BENCH_FRAMES=48 by default)
import { build } from 'esbuild';
import path from 'node:path';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { chromium } from 'playwright-core';

const root = path.resolve(import.meta.dirname, '../..');
const FRAMES = Number(process.env.BENCH_FRAMES ?? 48);
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

/** A blocking scene in a tank of nx × ny cells of `cell` metres, 24 fps, `frames` frames. */
function scene(nx: number, ny: number, cell: number, frames: number) {
  const W = nx * cell, H = ny * cell;
  return {
    version: 1,
    tank: { width: W, height: H, cellSize: cell, sides: { left: true, right: true, bottom: true, top: false } },
    timing: { fps: 24, startFrame: 1001, endFrame: 1000 + frames, substeps: 4 },
    physics: { pressureSolver: 'pcg-mic0', pressureTolerance: 1e-2, pressureIterations: 60, particlesPerCell: 4, flipRatio: 0.93 },
    pours: [
      { id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: W, height: 0.25 * H } },
      { id: 'dam', shape: { type: 'rect', x: 0, y: 0.25 * H, width: 0.25 * W, height: 0.4 * H } },
    ],
    walls: [{ id: 'rock', shape: { type: 'circle', x: 0.7 * W, y: 0.1 * H, radius: 0.08 * H } }],
    props: [{ id: 'crate', shape: { type: 'rect', x: 0.45 * W, y: 0.75 * H, width: 0.08 * W, height: 0.08 * W },
      keys: [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1010, dx: 0, dy: -0.55 * H, angle: 20 }] }],
  };
}

const pageEntry = `
import { LookRenderer } from './src/lib/render/looks';
window.runPreview = (scene) => new Promise((resolve, reject) => {
  const worker = new Worker('/preview.worker.js');
  const renderer = new LookRenderer(960, 540);
  const scale = 960 / scene.tank.width;
  const toView = { ox: 0, oy: 540, sx: scale, sy: scale };
  let first = 0, last = 0, frames = 0, particles = 0, cells = null, drawMs = 0, stepMs = 0, substeps = 0;
  let ticks = 0, worstGap = 0, lastTick = performance.now(), running = true;
  const raf = (now) => { ticks++; worstGap = Math.max(worstGap, now - lastTick); lastTick = now; if (running) requestAnimationFrame(raf); };
  requestAnimationFrame(raf);
  const t0 = performance.now();
  let startedAt = 0;
  worker.onerror = (e) => reject(new Error(e.message));
  worker.onmessage = (e) => {
    const m = e.data;
    if (m.type === 'error') { running = false; worker.terminate(); reject(new Error(m.message)); return; }
    if (m.type === 'started') { cells = m.cells; startedAt = performance.now(); return; }
    if (m.type === 'frame') {
      const d0 = performance.now();
      renderer.render('speed', { count: m.count, x: m.x, y: m.y, speed: m.speed, maxSpeed: Math.max(m.stats.maxSpeed, 0.5) }, toView);
      drawMs += performance.now() - d0;
      particles = m.count;
      if (m.stats.substeps > 0) { frames++; stepMs += m.stats.stepMs; substeps += m.stats.substeps; last = performance.now(); if (frames === 1) first = last; }
      return;
    }
    if (m.type === 'done') {
      running = false;
      worker.terminate();
      const wall = (last - startedAt) / 1000;
      const rafSeconds = (lastTick - t0) / 1000;
      resolve({ cells, particles, frames, wallSeconds: wall, fps: frames / wall, solverMsPerFrame: stepMs / frames, substepsPerFrame: substeps / frames,
        drawMsPerFrame: drawMs / (frames + 1), setupMs: startedAt - t0, pageRafFps: ticks / rafSeconds, worstRafGapMs: worstGap });
    }
  };
  worker.postMessage({ type: 'start', run: 1, scene, factor: 1 });
});
`;

async function main() {
  const common = { bundle: true, platform: 'browser' as const, write: false, minify: true, tsconfig: path.join(root, 'tsconfig.json'), logLevel: 'error' as const };
  const [workerBundle, pageBundle] = await Promise.all([
    build({ ...common, entryPoints: [path.join(root, 'src/lib/editor/preview.worker.ts')], format: 'iife' }),
    build({ ...common, stdin: { contents: pageEntry, resolveDir: root, sourcefile: 'bench-preview-page.js', loader: 'js' }, format: 'iife' }),
  ]);
  const files: Record<string, [string, string]> = {
    '/': ['text/html', '<!doctype html><html><body><script src="/page.js"></script></body></html>'],
    '/page.js': ['text/javascript', pageBundle.outputFiles![0].text],
    '/preview.worker.js': ['text/javascript', workerBundle.outputFiles![0].text],
  };
  const server = http.createServer((req, res) => {
    const f = files[req.url ?? '/'];
    if (!f) { res.writeHead(404).end(); return; }
    res.writeHead(200, { 'content-type': f[0] }).end(f[1]);
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const dir = mkdtempSync(path.join(tmpdir(), 'tidemark-bench-preview-'));
  const context = await chromium.launchPersistentContext(dir, { executablePath: '/usr/bin/chromium', args: ARGS, viewport: { width: 1280, height: 800 } });
  const results: Record<string, unknown>[] = [];
  try {
    const page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (e) => console.error('page error:', e.message));
    await page.goto(origin + '/');
    console.log(`live preview in a Web Worker, headless Chromium, ${FRAMES} frames at 24 fps, CG + MIC(0) pressure (tolerance 1e-2), 4 particles a cell`);
    for (const [nx, ny, cell] of [[96, 54, 0.02], [192, 108, 0.01]] as const) {
      const r = (await page.evaluate((s) => (window as any).runPreview(s), scene(nx, ny, cell, FRAMES))) as Record<string, number> & { cells: { nx: number; ny: number } };
      console.log(
        `  ${`${r.cells.nx} × ${r.cells.ny} cells`.padEnd(18)} ${String(r.particles).padStart(6)} particles  ${r.fps.toFixed(1).padStart(5)} frames/s` +
          `  (solver ${r.solverMsPerFrame.toFixed(1)} ms/frame, ${r.substepsPerFrame.toFixed(1)} substeps; page draws a frame in ${r.drawMsPerFrame.toFixed(1)} ms;` +
          ` page rAF ${r.pageRafFps.toFixed(0)} fps, worst gap ${r.worstRafGapMs.toFixed(0)} ms)`,
      );
      results.push({
        tank: `${nx}x${ny}`, cells: r.cells, particles: r.particles, frames: r.frames, fps: +r.fps.toFixed(2), solverMsPerFrame: +r.solverMsPerFrame.toFixed(2),
        substepsPerFrame: +r.substepsPerFrame.toFixed(2), drawMsPerFrame: +r.drawMsPerFrame.toFixed(2), pageRafFps: +r.pageRafFps.toFixed(1), worstRafGapMs: +r.worstRafGapMs.toFixed(1),
      });
    }
  } finally {
    await context.close();
    rmSync(dir, { recursive: true, force: true });
    server.close();
  }
  console.log(JSON.stringify({ bench: 'preview', frames: FRAMES, results }));
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
