// Browser: an artist opens a shot's blocking editor, draws a pour and a wall, adds a prop, times its impact, undoes and
// redoes, gets unsaved work offered back after a reload, runs the live preview and sees particles move, saves a version
// and starts its bake. Screenshots in test-results/screenshots/editor-*.png.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { openBrowser, screenshot, signInAs } from '../support/browser';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { uploadPngPlate } from '../support/plates';
import { db, closeDb } from '../../src/lib/server/db';
import { shots, shows } from '../../src/lib/server/db/schema';
import { rooftopPoolPlate, encodePng } from '../../src/lib/server/demo-plates';

let studio: TestStudio;
let shotId: number;

beforeAll(async () => {
  studio = await makeStudio();
  const [show] = await db().insert(shows).values({ studioId: studio.id, code: unique('ED').slice(0, 12), name: 'Editor show', frameRate: '25' });
  const [shot] = await db().insert(shots).values({
    studioId: studio.id, showId: Number(show.insertId), code: unique('SPLASH'), firstFrame: 1001, lastFrame: 1036, frameRate: '25', plateWidth: 960, plateHeight: 540,
  });
  shotId = Number(shot.insertId);
  // A plate, uploaded the way the app does it, and its scale: 1.6 m across the plate's 960 px.
  const bytes = rooftopPoolPlate(960, 540);
  const artist = studio.members.artist.client;
  await uploadPngPlate(studio, shotId, bytes, 'plate.png');
  await db().update(shots).set({ metresPerPixel: 1.6 / 960 }).where(eq(shots.id, shotId));
});
afterAll(closeDb);

type Doc = { pours: unknown[]; walls: unknown[]; props: { id: string; keys: { frame: number; dy: number }[] }[]; tank: { width: number; height: number; cellSize: number } };
const docOf = (page: Page) => page.evaluate(() => (window as any).tidemarkEditor.doc()) as Promise<Doc>;
const at = async (page: Page, x: number, y: number) => {
  const p = (await page.evaluate(([x, y]) => (window as any).tidemarkEditor.toClient(x, y), [x, y])) as [number, number];
  return { x: p[0], y: p[1] };
};
/** Drags in the view from one tank point to another (metres). */
async function drag(page: Page, from: [number, number], to: [number, number]) {
  const a = await at(page, ...from), b = await at(page, ...to);
  await page.mouse.move(a.x, a.y);
  await page.mouse.down();
  for (let k = 1; k <= 6; k++) await page.mouse.move(a.x + ((b.x - a.x) * k) / 6, a.y + ((b.y - a.y) * k) / 6);
  await page.mouse.up();
}

describe('blocking editor in Chromium', () => {
  it('blocks a splash, previews it, saves a version and starts its bake', async () => {
    const b = await openBrowser();
    const errors: string[] = [];
    b.page.on('pageerror', (e) => errors.push(e.message));
    try {
      const { page } = b;
      await signInAs(page, studio.members.artist.email, studio.members.artist.password);
      await page.waitForURL(new RegExp(`/studios/${studio.slug}/`));
      await page.goto(`/studios/${studio.slug}/shots/${shotId}/edit`);
      await page.getByTestId('editor-canvas').waitFor();
      expect(await page.getByTestId('previs-caution').textContent()).toMatch(/not how real liquids, rigs or people behave/);
      // New scene sized to the plate: 960 px × 1.6/960 m = 1.6 m wide, 0.9 m high.
      const start = await page.evaluate(() => (window as any).tidemarkEditor.doc().tank);
      expect([start.width, start.height]).toEqual([1.6, 0.9]);
      await page.waitForTimeout(300);
      await screenshot(page, 'editor-1-new-scene');

      // Pour: a pool along the bottom. Wall: a block on the right. Prop: a box above the pool.
      await page.getByTestId('editor-view').focus();
      await page.keyboard.press('2');
      await drag(page, [0.02, 0.02], [1.58, 0.3]);
      await page.keyboard.press('4');
      await drag(page, [1.2, 0.0], [1.4, 0.45]);
      await page.keyboard.press('5');
      await drag(page, [0.6, 0.7], [0.7, 0.8]);
      let doc = await docOf(page);
      expect(doc.pours).toHaveLength(1);
      expect(doc.walls).toHaveLength(1);
      expect(doc.props).toHaveLength(1);
      const pool = (doc.pours[0] as { shape: { type: string; y: number; height: number } }).shape;
      expect(pool.type).toBe('rect');
      expect(Math.abs(pool.y + pool.height - 0.3)).toBeLessThan(0.011); // snapped to the metres grid

      // Wall from a matte: a white disc on black, traced into a polygon over the plate.
      await page.keyboard.press('4');
      const rgb = new Uint8Array(96 * 54 * 3);
      for (let y = 0; y < 54; y++) for (let x = 0; x < 96; x++) if ((x - 30) ** 2 + (y - 40) ** 2 <= 64) rgb.fill(255, (y * 96 + x) * 3, (y * 96 + x) * 3 + 3);
      await page.getByTestId('matte-input').setInputFiles({ name: 'rock-matte.png', mimeType: 'image/png', buffer: Buffer.from(encodePng(96, 54, rgb)) });
      await expect.poll(async () => (await docOf(page)).walls.length).toBe(2);
      await page.keyboard.press('Control+z'); // keep the scene simple: only the block wall
      expect((await docOf(page)).walls).toHaveLength(1);
      // Pick the prop again with the Pick tool.
      await page.keyboard.press('1');
      const propAt = await at(page, 0.65, 0.75);
      await page.mouse.click(propAt.x, propAt.y);
      // Timing helper: the prop must reach the surface (0.3 m) on frame 1008, 0.28 s after release: about a drop from rest of 0.4 m.
      await page.getByTestId('timing-impact').fill('1008');
      await page.getByTestId('timing-impact').press('Enter');
      await page.getByRole('button', { name: /Set keys to hit on frame 1008/ }).click();
      await expect.poll(() => page.getByTestId('prop-impact-frame').textContent()).toBe('1008');
      expect(await page.getByTestId('impact-marker').getAttribute('data-frame')).toBe('1008');
      doc = await docOf(page);
      const keyed = doc.props[0].keys;
      expect(keyed.length).toBeGreaterThan(10);
      await screenshot(page, 'editor-2-blocked-and-timed');

      // Undo the keys, redo them.
      await page.getByTestId('editor-view').focus();
      await page.keyboard.press('Control+z');
      expect((await docOf(page)).props[0].keys).toHaveLength(1);
      expect(await page.getByTestId('impact-marker').count()).toBe(0);
      await page.keyboard.press('Control+Shift+z');
      expect((await docOf(page)).props[0].keys).toEqual(keyed);
      await page.getByRole('button', { name: 'Undo' }).click();
      await page.getByRole('button', { name: 'Redo' }).click();
      expect((await docOf(page)).props[0].keys).toEqual(keyed);

      // The help overlay lists our keys.
      await page.keyboard.press('?');
      await page.getByRole('dialog', { name: 'Keys and gestures' }).waitFor();
      await screenshot(page, 'editor-3-help');
      await page.keyboard.press('Escape');
      await page.getByRole('tab', { name: 'Parameters' }).click();
      await screenshot(page, 'editor-3b-parameters');
      // Any cell size in range is taken as typed, and the tank keeps its size (no snapping to whole cells)
      const tankBefore = (await docOf(page)).tank;
      const cellField = page.getByTestId('param-tank.cellSize');
      await cellField.fill('0.0137');
      await cellField.press('Enter');
      await page.waitForFunction(() => (window as any).tidemarkEditor.doc().tank.cellSize === 0.0137);
      const tankAfter = (await docOf(page)).tank;
      expect(tankAfter.width).toBe(tankBefore.width);
      expect(tankAfter.height).toBe(tankBefore.height);
      await screenshot(page, 'editor-3c-cell-size');
      await cellField.fill(String(tankBefore.cellSize));
      await cellField.press('Enter');
      await page.waitForFunction((c) => (window as any).tidemarkEditor.doc().tank.cellSize === c, tankBefore.cellSize);
      await page.getByRole('tab', { name: 'Inspector' }).click();

      // Unsaved work survives a reload and is offered back.
      await page.waitForTimeout(700);
      await page.reload();
      await page.getByTestId('draft-offer').waitFor();
      await page.getByRole('button', { name: 'Restore them' }).click();
      doc = await docOf(page);
      expect(doc.props[0].keys).toEqual(keyed);
      expect(doc.walls).toHaveLength(1);

      // Live preview at 1/2 resolution: frames stream in and particles move.
      await page.getByTestId('preview-resolution').selectOption('2');
      await page.getByRole('button', { name: 'Play' }).click();
      await page.waitForFunction(() => Number(document.querySelector('[data-testid=preview-stats]')?.getAttribute('data-computed')) >= 1016, null, { timeout: 60_000 });
      await page.getByRole('button', { name: 'Pause' }).click();
      const early = await page.evaluate(() => (window as any).tidemarkEditor.previewFrame(1001));
      const later = await page.evaluate(() => (window as any).tidemarkEditor.previewFrame(1016));
      expect(early.count).toBeGreaterThan(1000);
      const moved = early.x.reduce((n: number, _: number, i: number) => n + (i < later.count && (Math.abs(early.x[i] - later.x[i]) > 1e-3 || Math.abs(early.y[i] - later.y[i]) > 1e-3) ? 1 : 0), 0);
      expect(moved).toBeGreaterThan(100);
      // Two snapshots of the view: the particle image at frame 1001 and at 1016 differ.
      const canvas = page.getByTestId('editor-canvas');
      await page.getByTestId('frame-ruler').focus();
      await page.evaluate(() => (window as any).tidemarkEditor && void 0);
      const setFrame = async (f: number) => {
        const box = (await page.getByTestId('frame-ruler').boundingBox())!;
        await page.mouse.click(box.x + ((f - 1001) / 35) * box.width, box.y + box.height / 2);
        await expect.poll(() => page.getByTestId('current-frame').textContent()).toBe(String(f));
      };
      await setFrame(1001);
      await page.waitForTimeout(150);
      const shotA = await canvas.screenshot();
      await screenshot(page, 'editor-4-preview-1001');
      await setFrame(1016);
      await page.waitForTimeout(150);
      const shotB = await canvas.screenshot();
      await screenshot(page, 'editor-5-preview-1016');
      expect(Buffer.compare(shotA, shotB)).not.toBe(0);
      await page.getByLabel('Preview look').selectOption('surface');
      await page.waitForTimeout(200);
      await screenshot(page, 'editor-5b-preview-surface');
      expect(await page.getByTestId('preview-stats').textContent()).toMatch(/fps solved/);

      // Save as v001 with a comment, then bake it.
      await page.getByRole('button', { name: 'Save version…' }).click();
      await page.getByLabel('Comment').fill('Box drop timed to 1008');
      await page.getByRole('button', { name: 'Save version', exact: true }).click();
      await page.getByRole('heading', { name: 'Saved as v001' }).waitFor();
      await screenshot(page, 'editor-6-saved');
      await page.getByRole('button', { name: 'Bake this version' }).click();
      await page.getByTestId('bake-status').waitFor();
      expect(await page.getByTestId('bake-status').textContent()).toMatch(/Queued|Baking|baked/);
      const link = await page.getByRole('link', { name: 'Open v001' }).getAttribute('href');
      expect(link).toMatch(new RegExp(`/studios/${studio.slug}/versions/\\d+$`));
      await screenshot(page, 'editor-7-bake-started');

      // The saved scene is the one in the editor.
      const versionId = Number(link!.split('/').pop());
      const saved = await studio.members.artist.client.get(`/api/versions/${versionId}`);
      expect(saved.status).toBe(200);
      expect(saved.body.version.scene.props[0].keys).toEqual(keyed);
      expect(saved.body.version.comment).toBe('Box drop timed to 1008');
      // Opening the editor again starts from that version, with no draft to offer.
      await page.goto(`/studios/${studio.slug}/shots/${shotId}/edit`);
      await page.getByTestId('editor-canvas').waitFor();
      expect(await page.getByText('From v001').count()).toBe(1);
      expect(await page.getByTestId('draft-offer').count()).toBe(0);
      expect(errors).toEqual([]);
    } finally {
      await b.close();
    }
  }, 180_000);
});
