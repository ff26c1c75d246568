// Browser: a producer (supervisor) creates a show, imports a CMX 3600 EDL, changes a status inline, opens a shot with
// the keyboard, uploads a PNG plate straight to the object store and calibrates the scale by dragging on the plate;
// the plate's thumbnail (made by the server from a PNG, drawn by the browser from a WebP) shows on the shot page and
// in the shots table.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { openBrowser, screenshot as fullScreenshot, signInAs, waitForIslands } from '../support/browser';
import type { Page } from 'playwright-core';
import { APP, makeStudio, type TestStudio } from '../support/app';
import { closeDb, db } from '../../src/lib/server/db';
import { assets, shots, shows } from '../../src/lib/server/db/schema';
import { encodePng } from '../../src/lib/server/png';

// A CMX 3600 edit list (layout from memory): title, FCM, two cuts and a dissolve, clip names in comments. 24 fps.
const EDL = [
  'TITLE: BREAKWATER TEASER V3',
  'FCM: NON-DROP FRAME',
  '',
  '001  A001C001 V     C        10:00:00:00 10:00:02:00 01:00:00:00 01:00:02:00',
  '* FROM CLIP NAME: BW_0010.mov',
  '002  A001C002 V     C        11:00:00:00 11:00:01:12 01:00:02:00 01:00:03:12',
  '* FROM CLIP NAME: BW_0020.mov',
  '003  A001C002 V     C        11:00:01:12 11:00:01:12 01:00:03:12 01:00:03:12',
  '003  A002C001 V     D    012 12:00:00:00 12:00:03:00 01:00:03:12 01:00:06:12',
  '* FROM CLIP NAME: BW_0020.mov',
  '* TO CLIP NAME: BW_0030.mov',
  '',
].join('\n');

/** A full-page screenshot taken from the top (the sticky header would otherwise land mid-page). */
async function screenshot(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0));
  await fullScreenshot(page, name);
}

const PLATE_W = 320;
const PLATE_H = 180;

let studio: TestStudio;
let scratch: string;
beforeAll(async () => {
  studio = await makeStudio();
  scratch = mkdtempSync(path.join(tmpdir(), 'tidemark-library-'));
});
afterAll(async () => {
  rmSync(scratch, { recursive: true, force: true });
  await closeDb();
});

/** A 320×180 plate: sky over a dark sea wall, with a pale 160 px bar to measure (PNG via the demo encoder). */
function platePng(): Uint8Array {
  const rgb = new Uint8Array(PLATE_W * PLATE_H * 3);
  for (let y = 0; y < PLATE_H; y++)
    for (let x = 0; x < PLATE_W; x++) {
      const i = (y * PLATE_W + x) * 3;
      const wall = y > 110;
      const bar = y >= 86 && y <= 94 && x >= 32 && x < 192;
      rgb[i] = bar ? 240 : wall ? 40 : 120 + y / 3;
      rgb[i + 1] = bar ? 210 : wall ? 55 : 160 + y / 4;
      rgb[i + 2] = bar ? 90 : wall ? 60 : 200;
    }
  return encodePng(PLATE_W, PLATE_H, rgb);
}

describe('shot library in Chromium', () => {
  it('creates a show, imports an EDL, opens a shot, uploads a plate and calibrates its scale', async () => {
    const b = await openBrowser();
    try {
      const { page } = b;
      await signInAs(page, studio.members.supervisor.email, studio.members.supervisor.password);
      await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
      await page.goto(`/studios/${studio.slug}/`);
      await page.getByTestId('library').waitFor();
      await waitForIslands(page);

      // A new show.
      await page.getByRole('button', { name: 'New show', exact: true }).click();
      const dialog = page.getByRole('dialog');
      await dialog.getByLabel('Code').fill('BW');
      await dialog.getByLabel('Name').fill('Breakwater');
      // Client-side validation with the shared schema: a code with a space is refused next to the field.
      await dialog.getByLabel('Code').fill('B W');
      await dialog.getByRole('button', { name: 'Create show' }).click();
      await dialog.getByText(/Code may contain only letters/).waitFor();
      await dialog.getByLabel('Code').fill('BW');
      await dialog.getByLabel('Frame rate').selectOption('24');
      await dialog.getByLabel('Description').fill('Storm surge over the harbour wall');
      await dialog.getByRole('button', { name: 'Create show' }).click();
      await page.waitForURL(/\/shows\/\d+$/);
      const showId = Number(page.url().match(/\/shows\/(\d+)$/)![1]);
      const [show] = await db().select().from(shows).where(eq(shows.id, showId));
      expect([show!.code, show!.name, show!.frameRate, show!.studioId]).toEqual(['BW', 'Breakwater', '24', studio.id]);

      // Import the edit: preview first, then confirm.
      await page.getByRole('link', { name: 'Import EDL / CSV' }).click();
      await page.waitForURL(/\/import$/);
      // Text typed before the import island has hydrated is reset by it, and Preview then answers nothing.
      await page.locator('astro-island:not([ssr])').filter({ has: page.getByLabel('Edit decision list') }).waitFor({ timeout: 30_000 });
      // A malformed line (a letter O in a timecode) is reported by its line number and blocks a plain confirm.
      await page.getByLabel('Edit decision list').fill(`${EDL}004  A002C002 V     C        12:10:00:00 12:10:01:00 01:00:06:12 01:00:O7:12\n`);
      await page.getByRole('button', { name: 'Preview', exact: true }).click();
      await page.getByTestId('import-errors').getByText(/Line 12:/).waitFor();
      expect(await page.getByRole('button', { name: 'Confirm import' }).isDisabled()).toBe(true);
      await screenshot(page, 'library-import-errors');
      await page.getByLabel('Edit decision list').fill(EDL);
      await page.getByRole('button', { name: 'Preview', exact: true }).click();
      await page.getByTestId('import-errors').waitFor({ state: 'detached' });
      const previewTable = page.getByTestId('import-table');
      await previewTable.waitFor();
      const planned = await previewTable.locator('tbody tr').evaluateAll((rows) =>
        rows.map((r) => [
          r.getAttribute('data-kind'),
          // a code made from the clip name is an input the user may adjust
          r.querySelector<HTMLInputElement>('td:nth-child(2) input')?.value ?? r.querySelector('td:nth-child(2) span')?.textContent,
          r.querySelector('td:nth-child(4) span.font-medium')?.textContent,
        ]),
      );
      // 2 s = 48, 1.5 s = 36, 3 s = 72 frames at 24 fps, cut in at 1001 + 8 handles (common practice, no source).
      expect(planned).toEqual([
        ['create', 'BW_0010', '1009–1056'],
        ['create', 'BW_0020', '1009–1044'],
        ['create', 'BW_0030', '1009–1080'],
      ]);
      // The cut in (frame 1009) is labelled with the event's source in, 48 frames to 10:00:01:23 (CMX 3600 out exclusive).
      expect(await previewTable.textContent()).toContain('1009 · 10:00:00:00 – 1056 · 10:00:01:23');
      expect(await previewTable.textContent()).toContain('head 8 · tail 8');
      expect(await previewTable.textContent()).not.toContain('00:00:42:01'); // frame 1009 read as timecode at 24 fps
      await screenshot(page, 'library-import-preview');
      await page.getByRole('button', { name: 'Confirm import' }).click();
      await page.getByText('Imported into BW').waitFor();
      const imported = await db().select().from(shots).where(eq(shots.showId, showId)).orderBy(shots.code);
      expect(imported.map((s) => [s.code, s.firstFrame, s.lastFrame, s.headHandles, s.tailHandles])).toEqual([
        ['BW_0010', 1009, 1056, 8, 8],
        ['BW_0020', 1009, 1044, 8, 8],
        ['BW_0030', 1009, 1080, 8, 8],
      ]);

      // The shots table: timecode beside frames, inline status change (saved through the API).
      await page.getByRole('link', { name: 'See the shots' }).click();
      const table = page.getByTestId('shots-table');
      await table.locator('tbody tr[data-row]').nth(2).waitFor();
      // The table's island hydrated (a change before that reaches no handler and saves nothing).
      await page.locator('astro-island:not([ssr]) [data-testid="shots-table"]').waitFor();
      // BW_0030 (1009–1080, 72 frames) cuts in at source 12:00:00:00 (the dissolve's incoming side).
      expect(await table.getByTestId('cut-range-BW_0030-source').textContent()).toBe('1009 · 12:00:00:00 – 1080 · 12:00:02:23');
      await page.getByLabel('Status of BW_0020').selectOption('in review');
      await expect.poll(async () => (await db().select().from(shots).where(eq(shots.code, 'BW_0020')))[0]?.status).toBe('in review');
      // Filter by status: the URL keeps the filter.
      await page.getByRole('group', { name: 'Filter by status' }).getByRole('button', { name: 'in review' }).click();
      await expect.poll(() => table.locator('tbody tr[data-row]').count()).toBe(1);
      expect(page.url()).toContain('status=in+review');
      await page.getByRole('button', { name: 'Clear filters' }).click();
      await expect.poll(() => table.locator('tbody tr[data-row]').count()).toBe(3);

      // A refused inline edit rolls back and says why.
      await page.route('**/workflow', (route) =>
        route.fulfill({ status: 409, contentType: 'application/json', body: JSON.stringify({ error: { code: 'conflict', message: 'Someone else changed this shot' } }) }),
      );
      await page.getByLabel('Status of BW_0030').selectOption('on hold');
      await page.getByText('Could not change the status of BW_0030: Someone else changed this shot').waitFor();
      expect(await page.getByLabel('Status of BW_0030').inputValue()).toBe('blocking');
      await page.unroute('**/workflow');

      // Bulk status: Space selects rows from the keyboard.
      await table.locator('tbody tr[data-row]').nth(1).focus();
      await page.keyboard.press('Space');
      await page.keyboard.press('ArrowDown');
      await page.keyboard.press('Space');
      await page.getByRole('region', { name: 'Selected shots' }).getByText('2 selected').waitFor();
      await page.getByLabel('Status for the selected shots').selectOption('approved');
      await page.getByRole('button', { name: 'Apply' }).click();
      await page.getByText('2 shots now approved.').waitFor();
      const statuses = await db().select({ code: shots.code, status: shots.status }).from(shots).where(eq(shots.showId, showId)).orderBy(shots.code);
      expect(statuses.map((s) => s.status)).toEqual(['blocking', 'approved', 'approved']);

      // A new shot by hand: a server refusal (code taken) and a client one (range) land next to their fields.
      await page.getByRole('button', { name: 'New shot', exact: true }).click();
      const shotDialog = page.getByRole('dialog');
      await shotDialog.getByLabel('Code', { exact: true }).fill('BW_0010');
      // The studio's convention (the first frame number is the first head-handle frame) puts the cut in at 1001 + 8.
      expect(await shotDialog.getByLabel('Cut in', { exact: true }).inputValue()).toBe('1009');
      expect([await shotDialog.getByLabel('Head handles').inputValue(), await shotDialog.getByLabel('Tail handles').inputValue()]).toEqual(['8', '8']);
      await shotDialog.getByLabel('Cut out').fill('1100');
      await shotDialog.getByRole('button', { name: 'Create shot' }).click();
      await shotDialog.getByText('Code is already used by another shot in this show').waitFor();
      await shotDialog.getByLabel('Code', { exact: true }).fill('BW_0040');
      await shotDialog.getByLabel('Cut out').fill('1000');
      await shotDialog.getByRole('button', { name: 'Create shot' }).click();
      await shotDialog.getByText('Cut out must not be before the cut in').waitFor();
      await screenshot(page, 'library-new-shot');
      await shotDialog.getByLabel('Cut out').fill('1100');
      await shotDialog.getByLabel('Tail handles').fill('12');
      await shotDialog.getByLabel('Due date').fill('2031-03-31');
      // A shot by hand starts at 00:00:00:00 at the show's rate; the plate's own timecode is typed in.
      expect(await shotDialog.getByLabel('Source timecode at cut in').inputValue()).toBe('00:00:00:00');
      await shotDialog.getByLabel('Source timecode at cut in').fill('02:10:00:00');
      await shotDialog.getByRole('button', { name: 'Create shot' }).click();
      await page.getByText('Created BW_0040.').waitFor();
      await expect.poll(() => table.locator('tbody tr[data-row]').count()).toBe(4);
      const [made] = await db().select().from(shots).where(eq(shots.code, 'BW_0040'));
      expect([made!.firstFrame, made!.lastFrame, made!.headHandles, made!.tailHandles, made!.frameRate, String(made!.dueDate).slice(0, 10), made!.sourceTimecodeIn]).toEqual([
        1009, 1100, 8, 12, '24', '2031-03-31', '02:10:00:00',
      ]);
      // 1009–1100 is 92 frames: the cut out is 91 frames (3 s 19 f) after 02:10:00:00 at 24 fps (SMPTE ST 12-1, non-drop).
      expect(await table.getByTestId('cut-range-BW_0040-frames').textContent()).toBe('1009–1100');
      expect(await table.getByTestId('cut-range-BW_0040').textContent()).toContain('92f · head 8 · tail 12');
      expect(await table.getByTestId('cut-range-BW_0040-source').textContent()).toBe('1009 · 02:10:00:00 – 1100 · 02:10:03:19');
      await screenshot(page, 'library-shots');

      // Keyboard: focus the first row, ↓ to the second, ↑ back, Enter opens BW_0010.
      await table.locator('tbody tr[data-row]').first().focus();
      await page.keyboard.press('ArrowDown');
      expect(await page.evaluate(() => document.activeElement?.textContent)).toContain('BW_0020');
      await page.keyboard.press('ArrowUp');
      await page.keyboard.press('Enter');
      await page.waitForURL(/\/shots\/\d+$/);
      const shotId = Number(page.url().match(/\/shots\/(\d+)$/)![1]);
      expect(shotId).toBe(imported[0]!.id);
      await page.getByTestId('shot-page').getByRole('heading', { name: 'BW_0010' }).waitFor();
      // Frame 1009 (the cut in) is paired with the event's source in; the record range from the edit is shown too.
      expect(await page.getByTestId('frame-range-source').textContent()).toContain('1009 · 10:00:00:00 – 1056 · 10:00:01:23');
      expect(await page.getByTestId('frame-range').textContent()).toContain('48f · head 8 · tail 8');
      expect(await page.getByTestId('record-range').textContent()).toBe('record 01:00:00:00 – 01:00:02:00');
      expect(await page.getByRole('link', { name: 'Block a new version' }).getAttribute('href')).toBe(`/studios/${studio.slug}/shots/${shotId}/edit`);

      // Upload a plate: presigned POST from the browser, then the server's checks.
      const platePath = path.join(scratch, 'bw_0010_plate.png');
      writeFileSync(platePath, platePng());
      // The plate panel's island hydrated (a file chosen before that reaches no handler and uploads nothing).
      await waitForIslands(page);
      await page.getByTestId('plate-file').setInputFiles(platePath);
      await page.getByText(/New plate: bw_0010_plate\.png, 320×180/).waitFor({ timeout: 30_000 });
      const image = page.getByTestId('plate-image');
      await image.waitFor();
      await expect.poll(() => image.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBe(PLATE_W);
      const [withPlate] = await db().select().from(shots).where(eq(shots.id, shotId));
      expect(withPlate!.plateAssetId).toBeTruthy();
      expect([withPlate!.plateWidth, withPlate!.plateHeight]).toEqual([PLATE_W, PLATE_H]);
      // The server made the thumbnail from the PNG: it loads beside the shot's title, 320 px wide like the plate here.
      expect(withPlate!.thumbnailAssetId).toBeTruthy();
      const headerThumb = page.getByTestId('shot-page').getByTestId('shot-thumbnail');
      await headerThumb.waitFor();
      await expect.poll(() => headerThumb.evaluate((img: HTMLImageElement) => (img.complete ? [img.naturalWidth, img.naturalHeight] : null))).toEqual([320, 180]);

      // Calibrate: drag along the 160 px bar (x 32 → 192 of 320) and call it 4 m: 0.025 m per pixel.
      await page.getByRole('button', { name: 'Calibrate scale' }).click();
      const box = (await page.getByTestId('plate-overlay').boundingBox())!;
      const at = (px: number, py: number) => [box.x + (px / PLATE_W) * box.width, box.y + (py / PLATE_H) * box.height] as const;
      await page.mouse.move(...at(32, 90));
      await page.mouse.down();
      await page.mouse.move(...at(110, 90), { steps: 4 });
      await page.mouse.move(...at(192, 90), { steps: 4 });
      await page.mouse.up();
      await page.getByLabel('Real length (m)').fill('4');
      await screenshot(page, 'library-shot-calibrating');
      await page.getByRole('button', { name: 'Save scale' }).click();
      await page.getByTestId('scale-readout').getByText(/m per pixel/).waitFor();
      const [calibrated] = await db().select().from(shots).where(eq(shots.id, shotId));
      // The drag lands on whole screen pixels: allow one screen pixel of error at each end.
      const tolerance = 0.025 * ((2 * PLATE_W) / box.width / 160);
      expect(Math.abs(calibrated!.metresPerPixel! - 0.025)).toBeLessThan(tolerance);
      expect(await page.getByTestId('scale-readout').textContent()).toMatch(/plate is 8\.\d\d m wide|plate is 7\.9\d m wide/);
      await page.getByTestId('activity').getByText(/calibrated the scale/).waitFor();
      await screenshot(page, 'library-shot');

      // A WebP plate on BW_0020: the server cannot decode WebP, so this browser draws the thumbnail and uploads it.
      await page.goto(`/studios/${studio.slug}/shots/${imported[1]!.id}`);
      await page.getByTestId('shot-page').getByRole('heading', { name: 'BW_0020' }).waitFor();
      const webp = await page.evaluate(async () => {
        const canvas = document.createElement('canvas');
        canvas.width = 160;
        canvas.height = 90;
        const ctx = canvas.getContext('2d')!;
        ctx.fillStyle = '#2a6f97';
        ctx.fillRect(0, 0, 160, 90);
        ctx.fillStyle = '#f4d35e';
        ctx.fillRect(0, 60, 160, 30);
        const blob = await new Promise<Blob>((resolve) => canvas.toBlob((b) => resolve(b!), 'image/webp', 0.9));
        return Array.from(new Uint8Array(await blob.arrayBuffer()));
      });
      // The plate panel's island hydrated (a file chosen before that reaches no handler and uploads nothing).
      await waitForIslands(page);
      await page.getByTestId('plate-file').setInputFiles({ name: 'bw_0020.webp', mimeType: 'image/webp', buffer: Buffer.from(webp) });
      await page.getByText(/New plate: bw_0020\.webp, 160×90/).waitFor({ timeout: 30_000 });
      const webpThumb = page.getByTestId('shot-page').getByTestId('shot-thumbnail');
      await webpThumb.waitFor({ timeout: 30_000 });
      await expect.poll(() => webpThumb.evaluate((img: HTMLImageElement) => (img.complete ? [img.naturalWidth, img.naturalHeight] : null))).toEqual([320, 180]);
      const [webpShot] = await db().select().from(shots).where(eq(shots.id, imported[1]!.id));
      const [webpThumbAsset] = await db().select().from(assets).where(eq(assets.id, webpShot!.thumbnailAssetId!));
      expect([webpThumbAsset!.kind, webpThumbAsset!.contentType, webpThumbAsset!.width, webpThumbAsset!.height]).toEqual(['thumbnail', 'image/png', 320, 180]);
      await page.getByTestId('activity').getByText(/set a new thumbnail/).waitFor();

      // The shots table: a small thumbnail per shot that has one, loaded; a stand-in for the others.
      await page.goto(`/studios/${studio.slug}/shows/${showId}`);
      const shotsTable = page.getByTestId('shots-table');
      for (const code of ['BW_0010', 'BW_0020']) {
        const thumb = shotsTable.locator('tbody tr[data-row]', { hasText: code }).getByTestId('shot-thumbnail');
        await thumb.waitFor();
        await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBe(320);
      }
      await shotsTable.locator('tbody tr[data-row]', { hasText: 'BW_0030' }).getByTestId('shot-thumbnail-none').waitFor();
      await screenshot(page, 'library-shots-thumbnails');

      // The library home now lists the show with its three shots.
      await page.goto(`/studios/${studio.slug}/`);
      const showsTable = page.getByTestId('shows-table');
      await showsTable.waitFor();
      expect(await showsTable.textContent()).toMatch(/BW.*Breakwater.*24 fps4/);
      await screenshot(page, 'library-shows');
    } finally {
      await b.close();
    }
  }, 180_000);
});
