// Player benchmark: the player's drawing engine with 50k particles in headless Chromium on software WebGL
// (SwiftShader), for each render look at the on-page size and at full 1920×1080. Bundles the real engine and playback
// (src/components/player/) with esbuild, feeds them synthetic splash frames over a painted plate, and prints per look
// and size (two liquids, a wall, a turning prop, foam and spray drawn, as a version 2 clip asks): frame time mean/p95 (CPU + upload + GPU, waited for), the most frames rAF can draw, the fps the player's
// Playback holds at 24 and 25 fps, and the browser's own no-op redraw rate; then a JSON line.
// Run: npx tsx src/cli/bench-player.ts (BENCH_QUICK=1: 960×540 only; BENCH_PREVIEW=dir: pictures of each look).
import { build } from 'esbuild';
import path from 'node:path';
import { mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { chromium } from 'playwright-core';

const root = path.resolve(import.meta.dirname, '../..');
const PARTICLES = Number(process.env.BENCH_PARTICLES ?? 100_000); // the issue's case: 100k liquid particles plus foam
const FRAMES = 48;
const PLAY_FPS = [24, 25]; // the issue's shot rates
const PLAY_MS = Number(process.env.BENCH_PLAY_MS ?? 3000);
const SIZES: [number, number][] = process.env.BENCH_QUICK ? [[960, 540]] : [
  [960, 540],
  [1920, 1080],
];

// The page side: builds synthetic frames, opens the engine, and times each look.
const entry = `
import { PlayerEngine } from './src/components/player/engine';
import { Playback } from './src/components/player/playback';
import { RENDER_LOOKS } from './src/lib/render/looks';

function splashFrames(n, frames) {
  // A pool (80 %) with a crown of liquid thrown up and falling back (20 %), in a 3.2 m × 1.8 m tank.
  let seed = 7;
  const rnd = () => ((seed = (seed * 1664525 + 1013904223) >>> 0) / 4294967296);
  const base = [];
  for (let i = 0; i < n; i++) base.push([rnd(), rnd(), rnd()]);
  const out = [];
  for (let f = 0; f < frames; f++) {
    const t = f / 24;
    const x = new Float32Array(n), y = new Float32Array(n), speed = new Float32Array(n), liquid = new Uint8Array(n);
    let maxSpeed = 0;
    for (let i = 0; i < n; i++) {
      const [a, b, c] = base[i];
      // Two liquids side by side in the pool (left and right halves); the crown is of the left one.
      if (i < n * 0.8) {
        liquid[i] = a < 0.5 ? 0 : 1;
        x[i] = a * 3.2; y[i] = b * 0.5 + 0.02 * Math.sin(a * 20 + t * 6);
        speed[i] = 0.2 * c;
      } else {
        const ang = Math.PI * (0.15 + 0.7 * a), v0 = 2 + 2.5 * b;
        const vx = Math.cos(ang) * v0, vy = Math.sin(ang) * v0 - 9.81 * t;
        x[i] = 1.6 + Math.cos(ang) * v0 * t + 0.05 * c; y[i] = Math.max(0, 0.5 + Math.sin(ang) * v0 * t - 4.905 * t * t + 0.05 * c);
        speed[i] = Math.hypot(vx, vy);
      }
      if (speed[i] > maxSpeed) maxSpeed = speed[i];
    }
    // Foam on the pool's surface around the crown's foot (two thirds) and spray thrown wider than the crown (one
    // third): 6 % of the liquid's count, as a bake's diffuse section would carry.
    const dn = Math.round(n * 0.06), dx = new Float32Array(dn), dy = new Float32Array(dn), kind = new Uint8Array(dn);
    for (let i = 0; i < dn; i++) {
      const [a, b, c] = base[i];
      if (i < dn * 0.67) {
        kind[i] = 1; dx[i] = 1.6 + (a - 0.5) * (0.6 + 1.2 * t); dy[i] = 0.5 + 0.02 * Math.sin(a * 20 + t * 6) - 0.02 * b;
      } else {
        const ang = Math.PI * (0.1 + 0.8 * a), v0 = 2.5 + 3 * b;
        dx[i] = 1.6 + Math.cos(ang) * v0 * t + 0.08 * c; dy[i] = Math.max(0.5, 0.5 + Math.sin(ang) * v0 * t - 4.905 * t * t + 0.08 * c);
      }
    }
    // A can riding the crown, turning.
    out.push({ count: n, x, y, speed, maxSpeed, liquid, props: [{ x: 1.2 + 0.3 * t, y: 0.7 + 0.4 * t, angle: 90 * t }], diffuse: { count: dn, x: dx, y: dy, kind } });
  }
  return out;
}

// What a version 2 clip's header tells the player to draw: two liquids, a harbour wall (outlined), a can.
const LOOK = {
  liquids: [{ id: 'water', colour: '#3A8FB7' }, { id: 'paint', colour: '#C8341E' }],
  walls: [{ id: 'wall', shape: { type: 'rect', x: 2.8, y: 0, width: 0.4, height: 1.2 } }],
  wallStyle: 'outline',
  props: [{ id: 'can', shape: { type: 'rect', x: 1.167, y: 0.639, width: 0.066, height: 0.122 }, centroid: [1.2, 0.7], colour: '#D23C32' }],
};

function platePicture(w, h) {
  const c = document.createElement('canvas'); c.width = w; c.height = h;
  const g = c.getContext('2d');
  const grad = g.createLinearGradient(0, 0, 0, h); grad.addColorStop(0, '#465a78'); grad.addColorStop(1, '#14344a');
  g.fillStyle = grad; g.fillRect(0, 0, w, h);
  g.fillStyle = '#5a5a55'; g.fillRect(w * 0.875, h * 0.33, w * 0.125, h * 0.67);
  return c;
}

window.preview = async ({ particles, frames, width, height, look, frame }) => {
  const host = document.getElementById('host');
  host.innerHTML = '';
  host.style.width = width + 'px'; host.style.height = height + 'px';
  const data = splashFrames(particles, frames);
  const plateCanvas = platePicture(1920, 1080);
  const plate = { kind: 'still', width: 1920, height: 1080, frameAt: async () => plateCanvas, destroy() {} };
  const source = { startFrame: 1001, endFrame: 1000 + frames, tankWidth: 3.2, tankHeight: 1.8, look: LOOK, frameAt: async (f) => data[f - 1001] };
  // The can as a picture with alpha (yellow top half, a white band, transparent bottom half), to look at.
  const pw = 24, ph = 48, picture = { width: pw, height: ph, data: new Uint8Array(pw * ph * 4) };
  for (let v = 0; v < ph / 2; v++) for (let u = 0; u < pw; u++) picture.data.set(v % 12 < 3 ? [250, 250, 250, 255] : [240, 200, 20, 255], 4 * (v * pw + u));
  const engine = await PlayerEngine.create({ host, frames: source, plate, metresPerPixel: 3.2 / 1920, look, lookOptions: { restDensity: particles * 0.8 / (3.2 * 0.5), speedScale: 6, propImages: [picture] } });
  await engine.show(frame);
  window.previewEngine = engine;
};

// rAF-paced loop for ms milliseconds: calls fn(now) every tick; returns ticks per second.
async function rafRate(ms, fn) {
  const nextTick = () => new Promise((r) => requestAnimationFrame(r));
  for (let i = 0; i < 3; i++) await nextTick(); // let the compositor catch up after a burst of frames
  let ticks = 0;
  const start = await nextTick();
  let last = start;
  await new Promise((done) => {
    const tick = (now) => {
      last = now;
      fn && fn(now);
      ticks++;
      if (now - start < ms) requestAnimationFrame(tick); else done();
    };
    requestAnimationFrame(tick);
  });
  return (ticks - 1) / ((last - start) / 1000);
}

window.runBench = async ({ particles, frames, width, height, playFps, playMs }) => {
  const host = document.getElementById('host');
  host.innerHTML = '';
  host.style.width = width + 'px'; host.style.height = height + 'px';
  const data = splashFrames(particles, frames);
  const plateCanvas = platePicture(1920, 1080);
  const plate = { kind: 'still', width: 1920, height: 1080, frameAt: async () => plateCanvas, destroy() {} };
  const source = { startFrame: 1001, endFrame: 1000 + frames, tankWidth: 3.2, tankHeight: 1.8, look: LOOK, frameAt: async (f) => data[f - 1001] };
  const engine = await PlayerEngine.create({ host, frames: source, plate, metresPerPixel: 3.2 / 1920, look: 'surface', lookOptions: { restDensity: particles * 0.8 / (3.2 * 0.5), speedScale: 6 } });
  const gl = engine.app.renderer.gl;
  // gl.finish() returns before SwiftShader has drawn (Chromium's GPU process runs it later); reading one pixel back
  // waits for the frame, so the frame time below includes the GPU's share.
  const px = new Uint8Array(4);
  const sync = () => gl.readPixels(0, 0, 1, 1, gl.RGBA, gl.UNSIGNED_BYTE, px);
  for (let f = 1001; f <= 1000 + frames; f++) await engine.decode(f);
  const results = [];
  for (const look of RENDER_LOOKS) {
    engine.setLook(look);
    for (let f = 1001; f < 1006; f++) { engine.drawNow(f); sync(); } // warm-up
    const total = [], lookMs = [];
    for (let rep = 0; rep < 2; rep++) {
      for (let f = 1001; f <= 1000 + frames; f++) {
        const t0 = performance.now();
        engine.drawNow(f);
        sync();
        total.push(performance.now() - t0);
        lookMs.push(engine.lastTiming.lookMs);
      }
    }
    // Paced by requestAnimationFrame, a new frame every tick: the most playback could draw.
    let drawn = 0;
    const rafFps = await rafRate(2000, () => { engine.drawNow(1001 + (drawn++ % frames)); });
    // End to end: the player's own Playback (wall-clock frame choice, skips when late) at each shot rate.
    const playback = {};
    for (const fps of playFps) {
      const pb = new Playback(engine, () => {}, () => {});
      await rafRate(100, null);
      const t0 = performance.now();
      pb.start(1001, fps, { inFrame: 1001, outFrame: 1000 + frames, loop: true });
      await new Promise((r) => setTimeout(r, playMs));
      const secs = (performance.now() - t0) / 1000;
      pb.stop(false);
      playback[fps] = { drawnFps: pb.drawn / secs, skipped: pb.skipped, seconds: secs };
    }
    const q = (a, p) => { const s = [...a].sort((x, y) => x - y); return s[Math.min(s.length - 1, Math.floor(p * s.length))]; };
    const mean = (a) => a.reduce((s, v) => s + v, 0) / a.length;
    results.push({ look, width, height, particles, meanMs: mean(total), p95Ms: q(total, 0.95), lookMs: mean(lookMs), uploadDrawMs: mean(total) - mean(lookMs), rafFps, playback });
  }
  // Context: the browser's own rate on this machine now. A no-op redraw (pixi renders the unchanged stage), and
  // requestAnimationFrame with nothing drawn at all.
  const noopFps = await rafRate(2000, () => engine.app.render());
  const idleFps = await rafRate(2000, null);
  const rendererName = gl.getParameter(gl.RENDERER);
  engine.destroy();
  return { results, noopFps, idleFps, renderer: rendererName };
};
`;

interface Result {
  look: string;
  width: number;
  height: number;
  meanMs: number;
  p95Ms: number;
  lookMs: number;
  uploadDrawMs: number;
  rafFps: number;
  playback: Record<number, { drawnFps: number; skipped: number }>;
}

async function main() {
  const bundle = await build({
    stdin: { contents: entry, resolveDir: root, sourcefile: 'bench-player-entry.js', loader: 'js' },
    bundle: true,
    format: 'iife',
    platform: 'browser',
    write: false,
    minify: true,
    tsconfig: path.join(root, 'tsconfig.json'),
    logLevel: 'error',
  });
  const script = bundle.outputFiles[0].text;
  const dir = mkdtempSync(path.join(tmpdir(), 'tidemark-bench-chromium-'));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    viewport: { width: 1920, height: 1080 },
  });
  const all: unknown[] = [];
  let renderer = '';
  try {
    const page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (e) => console.error('page error:', e.message));
    await page.setContent('<!doctype html><html><body style="margin:0"><div id="host"></div></body></html>');
    await page.addScriptTag({ content: script });
    console.log(`player, ${PARTICLES.toLocaleString('en')} particles, headless Chromium, software WebGL (SwiftShader); ${cpus().length} cores, load ${loadavg()[0].toFixed(1)}`);
    console.log('  frame = look inputs on the CPU + upload + GPU draw, waited for (1-px read-back); rAF max = a new frame every tick;');
    console.log(`  playback = the player's Playback at the shot's fps for ${(PLAY_MS / 1000).toFixed(0)} s (frames drawn per second, frames skipped)`);
    for (const [width, height] of SIZES) {
      const out = (await page.evaluate((a) => (window as any).runBench(a), { particles: PARTICLES, frames: FRAMES, width, height, playFps: PLAY_FPS, playMs: PLAY_MS })) as {
        results: Result[];
        noopFps: number;
        idleFps: number;
        renderer: string;
      };
      renderer = out.renderer;
      for (const r of out.results) {
        const play = PLAY_FPS.map((f) => `${f} fps → ${r.playback[f].drawnFps.toFixed(1)} drawn, ${r.playback[f].skipped} skipped`).join('; ');
        console.log(
          `  ${r.look.padEnd(8)} ${`${r.width}×${r.height}`.padEnd(10)} frame ${r.meanMs.toFixed(1).padStart(5)} ms mean, ${r.p95Ms.toFixed(1).padStart(5)} ms p95` +
            ` (CPU ${r.lookMs.toFixed(1)} ms, upload + GPU ${r.uploadDrawMs.toFixed(1)} ms) · rAF max ${r.rafFps.toFixed(0)} fps · playback ${play}`,
        );
        all.push({
          ...r,
          meanMs: +r.meanMs.toFixed(2),
          p95Ms: +r.p95Ms.toFixed(2),
          lookMs: +r.lookMs.toFixed(2),
          uploadDrawMs: +r.uploadDrawMs.toFixed(2),
          rafFps: +r.rafFps.toFixed(1),
          playback: Object.fromEntries(PLAY_FPS.map((f) => [f, { drawnFps: +r.playback[f].drawnFps.toFixed(1), skipped: r.playback[f].skipped }])),
        });
      }
      console.log(`  ${'(browser)'.padEnd(8)} ${`${width}×${height}`.padEnd(10)} no-op redraw ${out.noopFps.toFixed(0)} fps, rAF with nothing drawn ${out.idleFps.toFixed(0)} fps (the ceiling here)`);
      all.push({ look: 'browser', width, height, noopRedrawFps: +out.noopFps.toFixed(1), idleRafFps: +out.idleFps.toFixed(1) });
    }
    // BENCH_PREVIEW=dir: a picture of frame 1012 in each look at each size, to look at.
    if (process.env.BENCH_PREVIEW) {
      for (const [width, height] of SIZES) {
        for (const look of ['surface', 'speed']) {
          await page.evaluate((a) => (window as any).preview(a), { particles: PARTICLES, frames: FRAMES, width, height, look, frame: 1012 });
          await page.waitForTimeout(300);
          await page.locator('#host').screenshot({ path: path.join(process.env.BENCH_PREVIEW, `bench-player-${look}-${width}.png`) });
          await page.evaluate(() => (window as any).previewEngine.destroy());
        }
      }
    }
  } finally {
    await context.close();
    rmSync(dir, { recursive: true, force: true });
  }
  console.log(JSON.stringify({ bench: 'player', particles: PARTICLES, renderer, cores: cpus().length, load: +loadavg()[0].toFixed(2), results: all }));
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
