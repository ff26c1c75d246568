// Browser, issue 12 items 5 and 6: a baked dam break opened on its version page. The player (WebGL; software GL in
// headless Chromium) draws a mid-clip frame; the Export panel's comp passes of that same frame (the CPU export
// renderer) are downloaded, unzipped and decoded with pngjs (independent of fast-png, which wrote them). The ZIP holds
// the README and one splash-with-alpha and one matte PNG at plate resolution; the player's liquid coverage is within
// 1 % of the frame of the matte's, and the liquid interior has the same colour in both.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { unzipSync } from 'fflate';
import { PNG } from 'pngjs';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { SHOTS_DIR, openBrowser, openPlayerAt, screenshot, signedIn } from '../support/browser';
import { bakeAndWait } from '../support/bake';
import { closeDb, db } from '../../src/lib/server/db';
import { shots, shows } from '../../src/lib/server/db/schema';
import { layoutView } from '../../src/lib/render/view';

const FIRST = 1001, LAST = 1016, SHOWN = 1010;
const PLATE = { width: 640, height: 360 };
const TANK = { width: 2, height: 1 };
const BACKGROUND = [0x0b, 0x14, 0x18]; // the player view's background (src/components/player/engine.ts)

let studio: TestStudio;
let versionId: number;
let shotCode: string;
const downloads = mkdtempSync(path.join(tmpdir(), 'tidemark-passes-'));

beforeAll(async () => {
  studio = await makeStudio();
  const artist = studio.members.artist.client;
  const [show] = await db().insert(shows).values({ studioId: studio.id, code: unique('PAS').slice(0, 30), name: 'Passes test', frameRate: '24' });
  shotCode = unique('PAS_010').slice(0, 20);
  const [shot] = await db()
    .insert(shots)
    .values({ studioId: studio.id, showId: Number(show.insertId), code: shotCode, firstFrame: FIRST, lastFrame: LAST, frameRate: '24', plateWidth: PLATE.width, plateHeight: PLATE.height });
  const scene = {
    version: 1, tank: { ...TANK, cellSize: 1 / 40 },
    timing: { fps: 24, startFrame: FIRST, endFrame: LAST, substeps: 2 }, physics: { seed: 7 },
    pours: [{ id: 'column', shape: { type: 'rect', x: 0, y: 0, width: 0.6, height: 0.6 } }],
  };
  const saved = await artist.post(`/api/shots/${Number(shot.insertId)}/versions`, { scene, comment: 'dam break for passes' });
  expect(saved.status, JSON.stringify(saved.body)).toBe(201);
  versionId = saved.body.version.id;
  await bakeAndWait(artist, versionId, 300_000);
  const [row] = await db().select().from(shots).where(eq(shots.id, Number(shot.insertId)));
  expect([row.plateWidth, row.plateHeight]).toEqual([PLATE.width, PLATE.height]);
}, 360_000);
afterAll(async () => {
  await closeDb();
  rmSync(downloads, { recursive: true, force: true });
});

describe('comp passes and the player agree', () => {
  it('exports the passes ZIP of a frame and matches the player’s liquid coverage and interior colour', async () => {
    const b = await openBrowser();
    try {
      const { page } = b;
      const errors = await signedIn(page, studio.members.artist);
      await openPlayerAt(page, studio.slug, versionId, SHOWN);
      mkdirSync(SHOTS_DIR, { recursive: true });
      const viewPng = await page.getByTestId('player-view').screenshot({ path: path.join(SHOTS_DIR, 'passes-agree-player-view.png') });
      const view = PNG.sync.read(viewPng);

      // The comp passes of the shown frame only, from the Export panel.
      const panel = page.getByTestId('export-panel');
      await panel.scrollIntoViewIfNeeded({ timeout: 30_000 });
      await page.locator('astro-island:not([ssr]) [data-testid="export-panel"]').waitFor({ timeout: 30_000 });
      await page.locator('input[name="export-format"][value="passes"]').check();
      await page.getByLabel('Frame range').selectOption('custom');
      await page.getByLabel('In frame').fill(String(SHOWN));
      await page.getByLabel('Out frame').fill(String(SHOWN));
      await expect.poll(async () => page.getByTestId('export-size').textContent()).toContain(`${PLATE.width}×${PLATE.height}`);
      await expect.poll(async () => page.getByTestId('passes-note').isVisible()).toBe(true);
      await screenshot(page, 'passes-agree-export-panel');
      await page.getByRole('button', { name: /^Export / }).click();
      await page.getByTestId('export-done').waitFor({ timeout: 120_000 });
      expect(await page.getByTestId('export-done').textContent()).toContain('Stored with the version');
      const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-download').click()]);
      expect(download.suggestedFilename()).toMatch(/_passes\.zip$/);
      const file = path.join(downloads, download.suggestedFilename());
      await download.saveAs(file);
      await expect.poll(async () => page.getByTestId('export-list').textContent()).toContain('Comp passes');

      const zip = unzipSync(new Uint8Array(readFileSync(file)));
      const base = `${shotCode.replace(/[^A-Za-z0-9_-]+/g, '-')}_v001.${SHOWN}.png`;
      expect(Object.keys(zip).sort()).toEqual(['README.txt', `matte/${base}`, `rgba/${base}`]);
      expect(new TextDecoder().decode(zip['README.txt'])).toMatch(/rgba\/[\s\S]*matte\//);
      const matte = PNG.sync.read(Buffer.from(zip[`matte/${base}`]));
      const rgba = PNG.sync.read(Buffer.from(zip[`rgba/${base}`]));
      for (const img of [matte, rgba]) expect([img.width, img.height]).toEqual([PLATE.width, PLATE.height]);
      writeFileSync(path.join(SHOTS_DIR, 'passes-agree-matte.png'), zip[`matte/${base}`]);
      writeFileSync(path.join(SHOTS_DIR, 'passes-agree-rgba.png'), zip[`rgba/${base}`]);

      // Matte coverage: fraction of the plate frame (grey level = coverage).
      let matteSum = 0;
      for (let p = 0; p < matte.data.length; p += 4) matteSum += matte.data[p] / 255;
      const matteFraction = matteSum / (PLATE.width * PLATE.height);

      // Player coverage: pixels of the plate's rectangle in the view that are not the background.
      const { plateRect } = layoutView({ viewWidth: view.width, viewHeight: view.height, tankWidth: TANK.width, tankHeight: TANK.height, plate: PLATE });
      const r = plateRect!;
      let covered = 0, total = 0;
      const diff = (p: number) => Math.abs(view.data[p] - BACKGROUND[0]) + Math.abs(view.data[p + 1] - BACKGROUND[1]) + Math.abs(view.data[p + 2] - BACKGROUND[2]);
      for (let y = Math.ceil(r.y); y < Math.floor(r.y + r.height); y++) {
        for (let x = Math.ceil(r.x); x < Math.floor(r.x + r.width); x++) {
          total++;
          if (diff(4 * (y * view.width + x)) > 60) covered++;
        }
      }
      const playerFraction = covered / total;
      console.log(`coverage: matte ${(matteFraction * 100).toFixed(2)} %, player ${(playerFraction * 100).toFixed(2)} % of the frame (view ${view.width}×${view.height})`);
      expect(matteFraction).toBeGreaterThan(0.05); // there is liquid to compare
      // the bound: within 1 % of the frame
      expect(Math.abs(playerFraction - matteFraction)).toBeLessThan(0.01);

      // Interior colour: plate pixels whose 7×7 neighbourhood is all liquid in the matte; the rgba pass over the
      // view's background against the player's pixel at the same place.
      const inside = (x: number, y: number) => {
        for (let dy = -3; dy <= 3; dy++) for (let dx = -3; dx <= 3; dx++) if (matte.data[4 * ((y + dy) * PLATE.width + x + dx)] !== 255) return false;
        return true;
      };
      const sums = { export: [0, 0, 0], player: [0, 0, 0], n: 0 };
      const scale = r.width / PLATE.width;
      for (let y = 3; y < PLATE.height - 3; y += 2) {
        for (let x = 3; x < PLATE.width - 3; x += 2) {
          if (!inside(x, y)) continue;
          const q = 4 * (y * PLATE.width + x);
          const a = rgba.data[q + 3] / 255;
          const vx = Math.min(view.width - 1, Math.floor(r.x + (x + 0.5) * scale));
          const vy = Math.min(view.height - 1, Math.floor(r.y + (y + 0.5) * scale));
          const v = 4 * (vy * view.width + vx);
          for (let c = 0; c < 3; c++) {
            sums.export[c] += rgba.data[q + c] * a + BACKGROUND[c] * (1 - a);
            sums.player[c] += view.data[v + c];
          }
          sums.n++;
        }
      }
      expect(sums.n).toBeGreaterThan(500);
      const meanExport = sums.export.map((s) => s / sums.n);
      const meanPlayer = sums.player.map((s) => s / sums.n);
      console.log(`interior colour: export ${meanExport.map((v) => v.toFixed(1)).join(', ')}, player ${meanPlayer.map((v) => v.toFixed(1)).join(', ')} (${sums.n} samples)`);
      // 8 levels a channel: well under what reads as a different colour side by side, common practice (no source)
      for (let c = 0; c < 3; c++) expect(Math.abs(meanExport[c] - meanPlayer[c])).toBeLessThan(8);
      expect(errors).toEqual([]);
    } finally {
      await b.close();
    }
  }, 300_000);
});
