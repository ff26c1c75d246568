// Browser: the hero demo shot (the free soda can dropped into the rooftop pool, CNB_020's scene from the demo seed)
// with the can drawn as the demo's prop picture (demoCanPicture: a fictional red can with a gold sun and a white wave
// band), uploaded like a plate, baked, and opened at a mid-clip frame on the version page, in a PNG export and on a
// share link; and the editor drawing it at the can's pose. The screenshots in test-results/screenshots/ are what a
// client would judge: the can is a can, where the solver put it.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { PNG } from 'pngjs';
import { unzipSync } from 'fflate';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { countPixels, hydrated, openBrowser, openPlayerAt, screenshot, signInAs, SHOTS_DIR, signedIn } from '../support/browser';
import { bakeAndWait } from '../support/bake';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { postUploadForm, uploadPngPlate } from '../support/plates';
import { closeDb, db } from '../../src/lib/server/db';
import { shots, shows } from '../../src/lib/server/db/schema';
import { demoScene } from '../../src/lib/server/seed';
import { demoCanPicture, encodePng, rooftopPoolPlate } from '../../src/lib/server/demo-plates';

let studio: TestStudio;
let versionId: number;
let shotId: number;
const FIRST = 1001, LAST = 1084, MID = 1042;
const PLATE = { width: 960, height: 540 };

beforeAll(async () => {
  studio = await makeStudio();
  const artist = studio.members.artist.client;
  const [show] = await db().insert(shows).values({ studioId: studio.id, code: unique('CNB').slice(0, 30), name: 'Prop picture test', frameRate: '25' });
  const [shot] = await db()
    .insert(shots)
    .values({ studioId: studio.id, showId: Number(show.insertId), code: unique('CNB_020').slice(0, 20), firstFrame: FIRST, lastFrame: LAST, frameRate: '25' });
  shotId = Number(shot.insertId);
  await uploadPngPlate(studio, shotId, rooftopPoolPlate(PLATE.width, PLATE.height), 'rooftop-pool.png');

  // The can's picture, uploaded as an artist would: start → presigned POST → complete.
  const png = demoCanPicture();
  const start = await artist.post(`/api/studios/${studio.id}/pictures`, { fileName: 'kestrelwell-can.png', contentType: 'image/png', byteSize: png.length });
  expect(start.status, JSON.stringify(start.body)).toBe(201);
  expect((await postUploadForm(start.body.upload, png, 'image/png')).status).toBeLessThan(300);
  const done = await artist.post(`/api/studios/${studio.id}/pictures/${start.body.assetId}/complete`, {});
  expect(done.status, JSON.stringify(done.body)).toBe(200);

  const demo = demoScene('CNB_020', 25, FIRST, LAST, done.body.picture.id)!;
  expect((await artist.post(`/api/studios/${studio.id}/shots/${shotId}/scale`, { pixels: PLATE.width, metres: demo.tankWidth })).status).toBe(200);
  const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: demo.scene, comment: 'Hero drop with the can picture' });
  expect(saved.status, JSON.stringify(saved.body)).toBe(201);
  versionId = saved.body.version.id;
  await bakeAndWait(artist, versionId, 420_000);
}, 480_000);
afterAll(closeDb);

// The picture's gold sun (#F4BE40 lit between ×0.55 and ×1.35, demo-plates.ts): warm with little blue. Nothing on the
// painted rooftop plate is (its sky's blue channel stays ≥ 110, the deck's 150; the water is blue).
const gold = (r: number, g: number, b: number) => r > 170 && g > 110 && g < 235 && b < 100 && r - b > 110;
// The can's red body (#D23C32 lit): also not on the plate.
const canRed = (r: number, g: number, b: number) => r > 130 && g < 90 && b < 90;

/** Pixels passing `test` and their bounding box. */
function where(png: Buffer, test: (r: number, g: number, b: number) => boolean) {
  const img = PNG.sync.read(png);
  let n = 0, minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (let y = 0; y < img.height; y++)
    for (let x = 0; x < img.width; x++) {
      const p = (y * img.width + x) * 4;
      if (!test(img.data[p], img.data[p + 1], img.data[p + 2])) continue;
      n++;
      minX = Math.min(minX, x); maxX = Math.max(maxX, x); minY = Math.min(minY, y); maxY = Math.max(maxY, y);
    }
  return { n, minX, minY, maxX, maxY };
}

describe('the hero demo can drawn as its picture', () => {
  it('shows the can picture where the solver put it at a mid-clip frame: version page, PNG export and share page', async () => {
    const b = await openBrowser();
    try {
      const { page } = b;
      const errors = await signedIn(page, studio.members.artist);
      await openPlayerAt(page, studio.slug, versionId, MID);
      await screenshot(page, 'prop-picture-mid-clip');
      const view = await page.getByTestId('player-view').screenshot({ path: 'test-results/screenshots/prop-picture-mid-clip-view.png' });
      const box = (await page.getByTestId('player-view').boundingBox())!;
      // The can: 66 × 122 mm in a 1.6 m tank drawn across the view's width; the sun a disc of radius 0.085 of the
      // picture's height (demoCanPicture), the picture stretched over the can's 122 mm.
      const pxPerM = box.width / 1.6;
      const canPx = 0.066 * 0.122 * pxPerM * pxPerM;
      const sunPx = Math.PI * (0.085 * 0.122 * pxPerM) ** 2;
      const red = where(view, canRed), sun = where(view, gold);
      console.log(`prop picture: ${red.n} red and ${sun.n} gold pixels (can ${Math.round(canPx)}, sun ${Math.round(sunPx)} expected) at ${box.width}×${box.height}`);
      // The red body fills most of the can but not all of it (the ends, band and sun are other colours).
      expect(red.n).toBeGreaterThan(canPx * 0.3);
      expect(red.n).toBeLessThan(canPx * 1.05);
      // The sun is drawn, about its size, inside the red of the can (the picture moves with the prop).
      expect(sun.n).toBeGreaterThan(sunPx * 0.4);
      expect(sun.n).toBeLessThan(sunPx * 2);
      expect(sun.minX).toBeGreaterThanOrEqual(red.minX - 2);
      expect(sun.maxX).toBeLessThanOrEqual(red.maxX + 2);
      expect(sun.minY).toBeGreaterThanOrEqual(red.minY - 2);
      expect(sun.maxY).toBeLessThanOrEqual(red.maxY + 2);

      // The particle-speed look draws the same picture.
      await page.getByRole('group', { name: 'Render look' }).getByRole('button', { name: 'Particle speed' }).click();
      await page.waitForTimeout(300);
      const speed = await page.getByTestId('player-view').screenshot({ path: 'test-results/screenshots/prop-picture-mid-clip-speed.png' });
      expect(countPixels(speed, gold)).toBeGreaterThan(sunPx * 0.4);

      // A PNG export of the mid-clip frame (rendered in this browser by the exports' renderer) draws it too.
      const panel = page.getByTestId('export-panel');
      await panel.scrollIntoViewIfNeeded({ timeout: 30_000 });
      await page.locator('astro-island:not([ssr]) [data-testid="export-panel"]').waitFor({ timeout: 30_000 });
      await panel.locator('input[name="export-format"][value="zip"]').check();
      await panel.getByLabel('Frame range').selectOption('custom');
      await panel.getByLabel('In frame').fill(String(MID));
      await panel.getByLabel('Out frame').fill(String(MID));
      await panel.getByRole('button', { name: /^Export / }).click();
      await page.getByTestId('export-done').waitFor({ timeout: 120_000 });
      const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-download').click()]);
      const zipped = readFileSync((await download.path())!);
      const entries = unzipSync(new Uint8Array(zipped));
      const frameName = Object.keys(entries).find((n) => n.endsWith(`.${MID}.png`));
      expect(frameName, Object.keys(entries).join(', ')).toBeDefined();
      mkdirSync(SHOTS_DIR, { recursive: true });
      writeFileSync(path.join(SHOTS_DIR, 'prop-picture-export-frame.png'), entries[frameName!]);
      const exported = PNG.sync.read(Buffer.from(entries[frameName!]));
      const ePxPerM = exported.width / 1.6;
      const eSun = Math.PI * (0.085 * 0.122 * ePxPerM) ** 2;
      const exportedSun = countPixels(Buffer.from(entries[frameName!]), gold);
      console.log(`prop picture (PNG export): ${exportedSun} gold pixels, ${Math.round(eSun)} expected at ${exported.width}×${exported.height}`);
      expect(exportedSun).toBeGreaterThan(eSun * 0.4);
      expect(exportedSun).toBeLessThan(eSun * 2);
      expect(errors).toEqual([]);

      // A client with a share link sees the same can: the share page draws with the exports' renderer.
      const link = await studio.members.supervisor.client.post(`/api/versions/${versionId}/share-links`, { expiresAt: new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10) });
      expect(link.status, JSON.stringify(link.body)).toBe(201);
      const guest = await openBrowser();
      try {
        const g = guest.page;
        await g.goto(new URL(link.body.url).pathname);
        await g.getByTestId('shared-canvas').waitFor({ timeout: 60_000 });
        const slider = await hydrated(g, 'shared-comment-form').then(() => g.getByRole('slider', { name: 'Frame' }));
        await expect.poll(() => slider.isEnabled(), { timeout: 60_000 }).toBe(true);
        await slider.fill(String(MID));
        await expect.poll(() => g.getByTestId('shared-frame').textContent(), { timeout: 30_000 }).toContain(String(MID));
        await g.waitForTimeout(1500);
        await screenshot(g, 'prop-picture-share-page');
        const shared = await g.getByTestId('shared-canvas').screenshot({ path: 'test-results/screenshots/prop-picture-share-view.png' });
        const sbox = (await g.getByTestId('shared-canvas').boundingBox())!;
        const sPxPerM = sbox.width / 1.6;
        const sSun = Math.PI * (0.085 * 0.122 * sPxPerM) ** 2;
        const sharedSun = countPixels(shared, gold);
        console.log(`prop picture (share page): ${sharedSun} gold pixels, ${Math.round(sSun)} expected at ${sbox.width}×${sbox.height}`);
        expect(sharedSun).toBeGreaterThan(sSun * 0.4);
        expect(sharedSun).toBeLessThan(sSun * 2);
      } finally {
        await guest.close();
      }
    } finally {
      await b.close();
    }
  }, 300_000);

  it('the editor draws the picture at the can\'s pose, and the Look section switches it and uploads another', async () => {
    const b = await openBrowser();
    try {
      const { page } = b;
      const errors = await signedIn(page, studio.members.artist);
      await page.goto(`/studios/${studio.slug}/shots/${shotId}/edit`);
      const canvas = page.getByTestId('editor-canvas');
      await canvas.waitFor();
      await hydrated(page, 'editor-view');
      const goldIn = async (name: string) => countPixels(await canvas.screenshot({ path: `test-results/screenshots/prop-picture-editor-${name}.png` }), gold);
      // The latest version names the picture: the view draws it once the studio's pictures are listed and decoded.
      await expect.poll(() => goldIn('opened'), { timeout: 30_000 }).toBeGreaterThan(10);
      await screenshot(page, 'prop-picture-editor');

      // Pick the can (free, at its drawn pose before the preview moves it) and open its Look.
      await page.getByTestId('editor-view').focus();
      await page.keyboard.press('1');
      const p = (await page.evaluate(() => (window as any).tidemarkEditor.toClient(0.8, 0.801))) as [number, number];
      await page.mouse.click(p[0], p[1]);
      const look = page.getByTestId('prop-look');
      await look.waitFor();
      expect(await look.getByRole('radio', { name: 'Picture' }).isChecked()).toBe(true);
      expect(await page.getByTestId('prop-picture').locator('option:checked').textContent()).toContain('kestrelwell-can.png');

      // Fill colour: the picture goes from the document and the view.
      await look.getByRole('radio', { name: 'Fill colour' }).check();
      await expect.poll(() => page.evaluate(() => (window as any).tidemarkEditor.doc().props[0].picture)).toBeUndefined();
      await expect.poll(() => goldIn('fill-colour')).toBe(0);

      // Picture again: a flat PNG is refused with the server's reason; the cut-out is taken and drawn.
      await look.getByRole('radio', { name: 'Picture' }).check();
      const flat = encodePng(16, 16, new Uint8Array(16 * 16 * 3).fill(200));
      await page.getByTestId('prop-picture-file').setInputFiles({ name: 'flat.png', mimeType: 'image/png', buffer: Buffer.from(flat) });
      await expect.poll(() => page.getByRole('alert').filter({ hasText: 'no transparency' }).count(), { timeout: 30_000 }).toBe(1);
      expect(await page.evaluate(() => (window as any).tidemarkEditor.doc().props[0].picture)).toBeUndefined();
      await page.getByTestId('prop-picture-file').setInputFiles({ name: 'can-again.png', mimeType: 'image/png', buffer: Buffer.from(demoCanPicture()) });
      await expect.poll(() => page.evaluate(() => (window as any).tidemarkEditor.doc().props[0].picture), { timeout: 30_000 }).toBeGreaterThan(0);
      await expect.poll(() => goldIn('uploaded'), { timeout: 30_000 }).toBeGreaterThan(10);

      // The live preview moves the free can; the picture goes with it.
      await page.getByRole('button', { name: 'Play' }).click();
      await page.waitForTimeout(4000);
      await page.getByRole('button', { name: 'Pause' }).click();
      await page.waitForTimeout(300);
      const frame = await page.evaluate(() => (window as any).tidemarkEditor.frame());
      console.log(`prop picture (editor): live preview paused at frame ${frame}`);
      expect(await goldIn('live-preview')).toBeGreaterThan(10);
      await screenshot(page, 'prop-picture-editor-live-preview');
      expect(errors).toEqual([]);
    } finally {
      await b.close();
    }
  }, 240_000);

  it('the compare view draws each side as its own scene names it: the picture on one, the fill colour on the other', async () => {
    const artist = studio.members.artist.client;
    const first = await artist.get(`/api/versions/${versionId}`);
    const scene = first.body.version.scene as { props: { picture?: number }[] };
    const { picture: _p, ...filled } = scene.props[0];
    const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: { ...scene, props: [filled] }, comment: 'The can in its fill colour' });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    const fillVersion = saved.body.version.id as number;
    // The picture is not part of the bake: the same scene hash, so the first version's clip is reused.
    expect(saved.body.version.sceneHash).toBe(first.body.version.sceneHash);
    await bakeAndWait(artist, fillVersion, 120_000);
    const b = await openBrowser();
    try {
      const { page } = b;
      await signInAs(page, studio.members.artist.email, studio.members.artist.password);
      await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
      await page.goto(`/studios/${studio.slug}/compare?a=${versionId}&b=${fillVersion}&frame=${MID}`);
      await expect.poll(() => page.getByTestId('compare-frame-number').textContent(), { timeout: 30_000 }).toBe(String(MID));
      // Side by side, once the island has hydrated (a click on the server-rendered button does nothing).
      await (await hydrated(page, 'compare-mode-side')).click();
      await expect.poll(() => page.getByTestId('compare-view').getAttribute('data-mode')).toBe('side');
      await page.waitForTimeout(800); // both engines follow their new host size
      await screenshot(page, 'prop-picture-compare');
      const a = await page.getByTestId('compare-a').screenshot({ path: 'test-results/screenshots/prop-picture-compare-a.png' });
      const bShot = await page.getByTestId('compare-b').screenshot({ path: 'test-results/screenshots/prop-picture-compare-b.png' });
      const box = (await page.getByTestId('compare-a').boundingBox())!;
      const sun = Math.PI * (0.085 * 0.122 * (box.width / 1.6)) ** 2;
      const goldA = countPixels(a, gold), goldB = countPixels(bShot, gold), redB = countPixels(bShot, canRed);
      console.log(`prop picture (compare): ${goldA} gold pixels on the picture side (${Math.round(sun)} expected), ${goldB} on the fill side, ${redB} red there`);
      expect(goldA).toBeGreaterThan(sun * 0.4);
      expect(goldB).toBe(0);
      expect(redB).toBeGreaterThan(0.066 * 0.122 * (box.width / 1.6) ** 2 * 0.6); // the can filled in its red
    } finally {
      await b.close();
    }
  }, 240_000);
});
