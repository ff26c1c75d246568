// Issue 3 acceptance: baking a 48-frame scene in a Node worker thread and in a browser Web Worker
// (Chromium) gives the same frames (identical bakeChecksum: SHA-256 over every frame's float32 bytes).
import { describe, it, expect } from 'vitest';
import { Worker } from 'node:worker_threads';
import { readFileSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build } from 'esbuild';
import { openBrowser } from '../support/browser';
import { APP } from '../support/app';

const FRAMES = 48;
const entryPath = fileURLToPath(new URL('./sim-worker-entry.ts', import.meta.url));
const bootPath = fileURLToPath(new URL('../sim/helpers/worker-boot.mjs', import.meta.url));

/** The small-drop fixture extended to 48 frames (a wall, a circle of water, 1/32 m cells). */
function scene(): Record<string, any> {
  const doc = JSON.parse(readFileSync(new URL('../fixtures/scenes/small-drop.json', import.meta.url), 'utf8'));
  doc.timing.endFrame = doc.timing.startFrame + FRAMES;
  return doc;
}

type Reply = { checksum?: string; error?: string };

function bakeInNodeThread(request: { scene: unknown; frames: number }): Promise<Reply> {
  return new Promise((resolve, reject) => {
    const w = new Worker(bootPath, { workerData: { entry: pathToFileURL(entryPath).href, request } });
    w.once('message', (m: Reply) => { resolve(m); void w.terminate(); });
    w.once('error', reject);
    w.once('exit', (code) => { if (code !== 0) reject(new Error(`worker exited with ${code}`)); });
  });
}

async function bakeInBrowserWorker(request: { scene: unknown; frames: number }): Promise<Reply> {
  const out = await build({ entryPoints: [entryPath], bundle: true, format: 'iife', write: false, platform: 'browser', external: ['node:*'] });
  const code = out.outputFiles[0].text;
  const b = await openBrowser();
  try {
    await b.page.goto(`${APP}/sign-in`); // an http origin, where blob: workers are allowed
    return await b.page.evaluate(({ code, request }) => new Promise<Reply>((resolve, reject) => {
      // the page's Web Worker (the Node Worker imported above is not in scope inside the page)
      const WebWorker = (globalThis as any).Worker;
      const w = new WebWorker(URL.createObjectURL(new Blob([code], { type: 'text/javascript' })));
      w.onmessage = (e: { data: Reply }) => { resolve(e.data); w.terminate(); };
      w.onerror = (e: { message: string }) => reject(new Error(e.message));
      w.postMessage(request);
    }), { code, request });
  } finally {
    await b.close();
  }
}

describe('bake in a Node worker thread and in a browser Web Worker', () => {
  it('gives identical frames (same bakeChecksum) for a 48-frame scene', async () => {
    const request = { scene: scene(), frames: FRAMES };
    const [node, browser] = await Promise.all([bakeInNodeThread(request), bakeInBrowserWorker(request)]);
    expect(node.error).toBeUndefined();
    expect(browser.error).toBeUndefined();
    expect(node.checksum).toMatch(/^[0-9a-f]{64}$/);
    expect(browser.checksum).toBe(node.checksum);
    // and a different scene gives a different checksum (the comparison can fail)
    const other = scene();
    other.physics.seed = 8;
    expect((await bakeInNodeThread({ scene: other, frames: FRAMES })).checksum).not.toBe(node.checksum);
  }, 120_000);
});
