// Builds tests/export/harness.tsx with Vite (so `?url` assets, the gif.js worker and the ffmpeg core are emitted as in
// the app) and serves it through Playwright routes under <app>/__harness/ — the same origin as the API, so the
// signed-in session cookie and the presigned URLs behave as on the version page.
import { build } from 'vite';
import { mkdtempSync, readFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { BrowserContext } from 'playwright-core';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '../..');
export const HARNESS_BASE = '/__harness/';

const TYPES: Record<string, string> = {
  '.js': 'text/javascript',
  '.mjs': 'text/javascript',
  '.wasm': 'application/wasm',
  '.woff2': 'font/woff2',
  '.css': 'text/css',
  '.map': 'application/json',
};

/** Builds the harness bundle once; returns its folder. */
export async function buildHarness(): Promise<string> {
  const outDir = mkdtempSync(path.join(tmpdir(), 'tidemark-harness-'));
  await build({
    configFile: false,
    root,
    base: HARNESS_BASE,
    logLevel: 'warn',
    resolve: { alias: { '~': path.join(root, 'src') } },
    mode: 'production',
    esbuild: { jsx: 'automatic', jsxDev: false },
    define: { 'process.env.NODE_ENV': '"production"' },
    worker: { format: 'es' },
    build: {
      outDir,
      emptyOutDir: true,
      target: 'es2022',
      minify: false,
      assetsInlineLimit: 0,
      copyPublicDir: false,
      rollupOptions: { input: path.join(here, 'harness.tsx'), output: { entryFileNames: 'entry.js' } },
    },
  });
  return outDir;
}

/** Serves the built harness at <app>/__harness/ in the context; index.html mounts the panels. */
export async function routeHarness(context: BrowserContext, appUrl: string, dir: string) {
  await context.route(`${appUrl}${HARNESS_BASE}**`, async (route) => {
    const rel = new URL(route.request().url()).pathname.slice(HARNESS_BASE.length);
    if (rel === '' || rel === 'index.html') {
      return route.fulfill({
        contentType: 'text/html',
        body: `<!doctype html><html><head><meta charset="utf-8"><title>Export harness</title></head><body><div id="root"></div><script type="module" src="${HARNESS_BASE}entry.js"></script></body></html>`,
      });
    }
    const file = path.join(dir, rel);
    if (!file.startsWith(dir) || !existsSync(file)) return route.fulfill({ status: 404, body: 'not found' });
    return route.fulfill({ status: 200, contentType: TYPES[path.extname(file)] ?? 'application/octet-stream', body: readFileSync(file) });
  });
}
