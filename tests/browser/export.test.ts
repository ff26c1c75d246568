// Issue 8 in Chromium, on the real version page: a producer (the studio's supervisor) opens the shot of an imported
// edit (frame 1009 paired with the cut's source timecode), then a really baked version of it,
// exports an MP4, a GIF and a PNG ZIP with slate and burn-ins (progress bar to 100 %, downloads caught by Playwright),
// cancels one export and carries on, makes a share link, opens it in a fresh browser without signing in, leaves a
// named comment, and sees the comment in the version page's notes. The files are checked in Node: ffprobe (MP4),
// omggif (GIF), fflate (ZIP); the MP4's first shot frame is read two ways: its timecode track (ffprobe) and its pixels
// (decoded with ffmpeg, compared with the lossless PNG of the same frame). Chromium runs with web security on: the S3
// stand-in allows the test app's origin.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Page } from 'playwright-core';
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { GifReader } from 'omggif';
import { unzipSync } from 'fflate';
import { makeStudio, type TestStudio } from '../support/app';
import { SHOTS_DIR, openBrowser, screenshot, signInAs } from '../support/browser';
import { tinyScene } from '../support/scenes';
import { closeDb, db } from '../../src/lib/server/db';
import { notes, shots } from '../../src/lib/server/db/schema';
import { burnInLayout, gifDelays } from '../../src/lib/export/layout';

// One 24-frame cut at 24 fps (CMX 3600 layout, from memory): source 01:00:10:00–01:00:11:00, record out exclusive.
// The studio's default convention puts 1001 on the first of 8 head handles (common practice (no source)): cut in 1009.
const EDIT = ['TITLE: LOW TIDE', 'FCM: NON-DROP FRAME', '001  RL01     V     C        01:00:10:00 01:00:11:00 01:00:00:00 01:00:01:00', '* FROM CLIP NAME: LT_010'].join('\n');
const FIRST = 1009;
const LAST = 1032;
const PLATE = { width: 640, height: 360 }; // "Half" → 320×180
// The slate is held 1 s by default in every format (common practice (no source)): 24 pictures at 24 fps.
const SLATE = 24;
const SHOT_FRAMES = LAST - FIRST + 1;

let studio: TestStudio;
let versionId: number;
let shotCode: string;
let shotId: number;
const downloads = mkdtempSync(path.join(tmpdir(), 'tidemark-exports-'));

async function waitBaked(id: number) {
  const c = studio.members.supervisor.client;
  for (let i = 0; i < 900; i++) {
    const res = await c.get(`/api/versions/${id}/bake`);
    if (res.body.bakeState === 'baked') return;
    if (res.body.bakeState === 'failed') throw new Error(`bake failed: ${res.body.bake?.error}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error('bake did not finish');
}

beforeAll(async () => {
  studio = await makeStudio();
  const sup = studio.members.supervisor;
  const show = await sup.client.post(`/api/studios/${studio.id}/shows`, { code: 'LT', name: 'Low Tide', frameRate: '24' });
  expect(show.status, JSON.stringify(show.body)).toBe(201);
  const imported = await sup.client.post(`/api/studios/${studio.id}/shows/${show.body.show.id}/import/confirm`, { format: 'edl', text: EDIT, options: { headHandles: 8, tailHandles: 8 } });
  expect(imported.status, JSON.stringify(imported.body)).toBe(200);
  shotId = imported.body.import.created[0].id;
  const [made] = await db().select().from(shots).where(eq(shots.id, shotId));
  expect([made.firstFrame, made.lastFrame, made.sourceTimecodeIn]).toEqual([FIRST, LAST, '01:00:10:00']);
  expect((await sup.client.patch(`/api/studios/${studio.id}/shots/${shotId}`, { plateWidth: PLATE.width, plateHeight: PLATE.height })).status).toBe(200);
  const scene = { ...tinyScene(LAST - FIRST + 1, 7), timing: { fps: 24, startFrame: FIRST, endFrame: LAST, substeps: 2 } };
  const saved = await sup.client.post(`/api/shots/${shotId}/versions`, { scene, comment: 'for export' });
  expect(saved.status).toBe(201);
  versionId = saved.body.version.id;
  expect((await sup.client.post(`/api/versions/${versionId}/bake`)).status).toBe(202);
  await waitBaked(versionId);
  const [shotRow] = await db().select().from(shots).where(eq(shots.id, shotId));
  shotCode = shotRow.code;
}, 240_000);

afterAll(async () => {
  await closeDb();
  rmSync(downloads, { recursive: true, force: true });
});

/**
 * Waits until the island holding `testId` is hydrated: the version page mounts the Export and Share panels with
 * `client:visible`, so they are scrolled to, and their server-rendered HTML is inert until Astro drops `ssr`.
 */
async function hydrated(page: Page, testId: string) {
  const panel = page.getByTestId(testId);
  await panel.scrollIntoViewIfNeeded({ timeout: 30_000 });
  await page.locator(`astro-island:not([ssr]) [data-testid="${testId}"]`).waitFor({ timeout: 30_000 });
  return panel;
}

/** A full-page screenshot from the top, so the app shell's sticky header is drawn where it belongs. */
async function pageShot(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0));
  await screenshot(page, name);
}

/** Picks a format, exports, waits for the bar to reach 100 %, and saves the download. */
async function exportAndDownload(page: Page, format: 'gif' | 'mp4' | 'zip'): Promise<string> {
  await page.locator(`input[name="export-format"][value="${format}"]`).check();
  await page.getByRole('button', { name: /^Export / }).click();
  await page.getByTestId('export-done').waitFor({ timeout: 120_000 }).catch(async (e) => {
    await screenshot(page, `export-${format}-failed`);
    throw new Error(`${(e as Error).message}\nexport panel: ${await page.getByTestId('export-panel').innerText().catch(() => '(gone)')}`);
  });
  expect(await page.getByRole('progressbar', { name: 'Export progress' }).getAttribute('aria-valuenow')).toBe('100');
  expect(await page.getByTestId('export-done').textContent()).toContain('Stored with the version');
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-download').click()]);
  const file = path.join(downloads, download.suggestedFilename());
  await download.saveAs(file);
  return file;
}

/** An image file decoded by ffmpeg to RGBA bytes (its size is known to the caller). */
function rgbOf(file: string): Uint8Array {
  return new Uint8Array(execFileSync('ffmpeg', ['-v', 'error', '-i', file, '-f', 'rawvideo', '-pix_fmt', 'rgba', '-']));
}

function writeTemp(bytes: Uint8Array, name: string): string {
  const file = path.join(downloads, name);
  writeFileSync(file, bytes);
  return file;
}

/** Mean absolute difference of the RGB values of two RGBA images inside a rectangle (0–255). */
function meanDiff(a: Uint8Array, b: Uint8Array, width: number, r: { x0: number; y0: number; x1: number; y1: number }): number {
  let total = 0;
  let n = 0;
  for (let y = Math.max(0, Math.floor(r.y0)); y < Math.ceil(r.y1); y++) {
    for (let x = Math.max(0, Math.floor(r.x0)); x < Math.ceil(r.x1); x++) {
      const i = (y * width + x) * 4;
      for (let c = 0; c < 3; c++) total += Math.abs(a[i + c] - b[i + c]);
      n += 3;
    }
  }
  return total / n;
}

/** Pixels of a GIF frame as RGBA. */
function gifFrame(reader: GifReader, i: number): Uint8Array {
  const px = new Uint8Array(reader.width * reader.height * 4);
  reader.decodeAndBlitFrameRGBA(i, px);
  return px;
}

/** Count of bright (text-coloured) pixels in a rectangle, and a checksum of the rectangle. */
function region(px: Uint8Array, width: number, r: { x0: number; y0: number; x1: number; y1: number }) {
  let bright = 0;
  let sum = 0;
  for (let y = Math.max(0, Math.floor(r.y0)); y < Math.ceil(r.y1); y++) {
    for (let x = Math.max(0, Math.floor(r.x0)); x < Math.ceil(r.x1); x++) {
      const i = (y * width + x) * 4;
      if (px[i] > 180 && px[i + 1] > 180 && px[i + 2] > 170) bright++;
      sum = (sum * 31 + px[i] + 7 * px[i + 1] + 13 * px[i + 2]) >>> 0;
    }
  }
  return { bright, sum };
}

describe('exports and share links in Chromium', () => {
  it('exports MP4, GIF and PNG ZIP with slate and burn-ins from the version page, cancels one, shares the version, and a client comments', async () => {
    const b = await openBrowser();
    const viewer = await openBrowser();
    try {
      const { page } = b;
      const sup = studio.members.supervisor;
      await signInAs(page, sup.email, sup.password);
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      page.on('console', (m) => m.type() === 'error' && console.log(`[version page console] ${m.text()}`));
      // The shot page of the imported cut: the cut in is paired with the event's source in, the cut out with the
      // source out − 1 frame (CMX 3600 out exclusive; 24 fps non-drop labels, SMPTE ST 12-1).
      await page.goto(`/studios/${studio.slug}/shots/${shotId}`);
      expect(await page.getByTestId('frame-range-source').textContent()).toBe(`${FIRST} · 01:00:10:00 – ${LAST} · 01:00:10:23`);
      expect(await page.getByTestId('frame-range').textContent()).toContain('24f · head 8 · tail 8');
      await pageShot(page, 'export-shot-page');
      const versionPage = `/studios/${studio.slug}/versions/${versionId}`;
      await page.goto(versionPage);
      await page.getByTestId('version-header').waitFor();
      expect(await page.getByTestId('bake-state').textContent()).toBe('baked');
      await hydrated(page, 'export-panel').catch(async (e) => {
        await screenshot(page, 'export-page-failed');
        throw new Error(`${e.message}\npage errors: ${errors.join('; ')}\nurl: ${page.url()}`);
      });
      await hydrated(page, 'share-panel');
      // The page hands the panel the show's name (for the slate), not only its code.
      const islandProps = await page.locator('astro-island', { has: page.getByTestId('export-panel') }).getAttribute('props');
      expect(islandProps).toContain('Low Tide');
      expect(await page.getByTestId('export-size').textContent()).toContain('320×180');
      await page.getByTestId('export-list').or(page.getByText('None yet.')).waitFor();
      await pageShot(page, 'export-version-page');

      // ── MP4 ──
      const mp4 = await exportAndDownload(page, 'mp4');
      expect(path.basename(mp4)).toMatch(new RegExp(`_v001_${FIRST}-${LAST}\\.mp4$`));
      const probe = JSON.parse(
        execFileSync('ffprobe', ['-v', 'error', '-count_frames', '-select_streams', 'v:0', '-show_entries', 'stream=codec_name,pix_fmt,r_frame_rate,avg_frame_rate,width,height,nb_read_frames', '-of', 'json', mp4]).toString(),
      ).streams[0];
      expect(probe).toMatchObject({ codec_name: 'h264', pix_fmt: 'yuv420p', r_frame_rate: '24/1', width: 320, height: 180 });
      expect(Number(probe.nb_read_frames)).toBe(SLATE + SHOT_FRAMES); // 24 slate pictures + 24 frames
      // The slate frames counted in the decoded video (ffmpeg's own decoder): every picture that looks like picture 0.
      const mp4Pictures = new Uint8Array(execFileSync('ffmpeg', ['-v', 'error', '-i', mp4, '-f', 'rawvideo', '-pix_fmt', 'rgba', '-'], { maxBuffer: 64 * 1024 * 1024 }));
      const pictureBytes = 320 * 180 * 4;
      const mp4Picture = (i: number) => mp4Pictures.subarray(i * pictureBytes, (i + 1) * pictureBytes);
      const whole = { x0: 0, y0: 0, x1: 320, y1: 180 };
      const mp4SlateCount = Array.from({ length: SLATE + SHOT_FRAMES }, (_, i) => meanDiff(mp4Picture(i), mp4Picture(0), 320, whole) < 2).filter(Boolean).length;
      expect(mp4SlateCount).toBe(SLATE);
      expect(meanDiff(mp4Picture(SLATE), mp4Picture(0), 320, whole)).toBeGreaterThan(10); // the first shot frame is no slate
      // Read 1 of the first frame's timecode: the MP4's timecode track (QuickTime 'tmcd', ffprobe's stream tag). The
      // 24 slate pictures hold the second before the cut in (from 01:00:09:00), so picture 25, the first shot frame, is 01:00:10:00.
      const tracks = JSON.parse(execFileSync('ffprobe', ['-v', 'error', '-show_entries', 'stream=codec_type:stream_tags=timecode', '-of', 'json', mp4]).toString()).streams;
      expect(tracks.find((s: { codec_type: string }) => s.codec_type === 'video').tags.timecode).toBe('01:00:09:00');
      expect(await page.evaluate(() => document.fonts.check('600 16px "Space Grotesk"'))).toBe(true);
      await pageShot(page, 'export-mp4-done');

      // ── GIF ──
      const gifPath = await exportAndDownload(page, 'gif');
      const gifBytes = new Uint8Array(readFileSync(gifPath));
      expect(gifBytes[gifBytes.length - 1]).toBe(0x3b); // the trailer is the last byte: gif.js's zero padding trimmed
      const gif = new GifReader(gifBytes);
      expect(gif.width).toBe(320);
      expect(gif.height).toBe(180);
      expect(gif.numFrames()).toBe(SLATE + SHOT_FRAMES);
      expect(gif.loopCount()).toBe(0); // loop forever
      const delays = Array.from({ length: gif.numFrames() }, (_, i) => gif.frameInfo(i).delay);
      // 24 fps as 4/4/5/4/4/4… cs (running time rounded to the centisecond: 24 frames = 100 cs), slate included.
      expect(delays).toEqual(gifDelays(24, SLATE + SHOT_FRAMES));
      // The slate frames counted by an independent decoder (omggif): frames whose picture is the first one's.
      const slateGif = gifFrame(gif, 0);
      const gifSlateFrames = Array.from({ length: gif.numFrames() }, (_, i) => i).filter((i) => meanDiff(gifFrame(gif, i), slateGif, 320, { x0: 0, y0: 0, x1: 320, y1: 180 }) < 2);
      expect(gifSlateFrames).toEqual(Array.from({ length: SLATE }, (_, i) => i));
      expect(gifSlateFrames.reduce((a, i) => a + delays[i], 0)).toBe(100); // held 1 s, as in the MP4
      expect(delays.slice(SLATE).reduce((a, c) => a + c, 0)).toBe(100);

      // Burn-in pixels: the timecode corner holds text, and differs between the first and last frames, whose
      // labels are the source timecode of those frames (source in 01:00:10:00 at the cut in; 23 frames on at 24 fps).
      const lay = (f: number) =>
        burnInLayout({ studioName: '', showName: '', shotCode: '', versionNumber: 1, artistName: null, date: '', reviewState: '', rateId: '24', cutIn: FIRST, sourceTimecodeIn: '01:00:10:00' }, f, 320, 180);
      const tcFirst = lay(FIRST).texts.find((t) => t.id === 'timecode')!;
      expect(tcFirst.text).toBe('01:00:10:00');
      expect(lay(LAST).texts.find((t) => t.id === 'timecode')!.text).toBe('01:00:10:23');
      const box = { x0: tcFirst.x - tcFirst.maxWidth * 0.8, y0: tcFirst.y - tcFirst.size, x1: tcFirst.x, y1: tcFirst.y + 2 };
      const first = region(gifFrame(gif, SLATE), 320, box);
      const last = region(gifFrame(gif, gif.numFrames() - 1), 320, box);
      expect(first.bright).toBeGreaterThan(20);
      expect(last.bright).toBeGreaterThan(20);
      expect(first.sum).not.toBe(last.sum);
      // The slate is a different picture from the first frame.
      expect(region(gifFrame(gif, 0), 320, { x0: 0, y0: 0, x1: 320, y1: 180 }).sum).not.toBe(region(gifFrame(gif, SLATE), 320, { x0: 0, y0: 0, x1: 320, y1: 180 }).sum);

      // ── PNG ZIP ──
      const zipPath = await exportAndDownload(page, 'zip');
      mkdirSync(SHOTS_DIR, { recursive: true });
      const entries = unzipSync(new Uint8Array(readFileSync(zipPath)));
      const names = Object.keys(entries).sort();
      expect(names).toHaveLength(SLATE + SHOT_FRAMES);
      // the slate as 24 PNGs too, the same picture each
      expect(names.filter((n) => n.includes('_slate')).length).toBe(SLATE);
      expect(names[0]).toMatch(/\.0000_slate\.png$/);
      expect(names[SLATE - 1]).toMatch(/\.0000_slate_024\.png$/);
      expect(Buffer.from(entries[names[SLATE - 1]]).equals(Buffer.from(entries[names[0]]))).toBe(true);
      expect(names[SLATE]).toMatch(new RegExp(`\\.${FIRST}\\.png$`));
      expect(names[names.length - 1]).toMatch(new RegExp(`\\.${LAST}\\.png$`));
      // Keep the slate and a frame beside the screenshots, to look at.
      writeFileSync(path.join(SHOTS_DIR, 'export-slate.png'), entries[names[0]]);
      writeFileSync(path.join(SHOTS_DIR, `export-frame-${FIRST + 11}.png`), entries[names[SLATE + 11]]);

      // Read 2 of the MP4's first frame: decode its picture 25 (after the slate) with ffmpeg and compare its timecode
      // corner with the lossless PNGs of the cut in (burn-in 01:00:10:00) and the cut out (01:00:10:23).
      const firstPng = path.join(SHOTS_DIR, 'export-mp4-first-frame.png');
      execFileSync('ffmpeg', ['-v', 'error', '-y', '-i', mp4, '-vf', `select=eq(n\\,${SLATE})`, '-frames:v', '1', firstPng]);
      const mp4First = rgbOf(firstPng);
      const pngIn = rgbOf(writeTemp(entries[names[SLATE]], 'cut-in.png'));
      const pngOut = rgbOf(writeTemp(entries[names[names.length - 1]], 'cut-out.png'));
      const nearIn = meanDiff(mp4First, pngIn, 320, box);
      const nearOut = meanDiff(mp4First, pngOut, 320, box);
      expect(nearIn).toBeLessThan(nearOut / 2); // the MP4's first frame carries the cut in's burn-in, not another frame's
      for (const n of names) {
        const png = entries[n];
        const dv = new DataView(png.buffer, png.byteOffset);
        expect(Array.from(png.subarray(1, 4))).toEqual([0x50, 0x4e, 0x47]); // "PNG"
        expect([dv.getUint32(16), dv.getUint32(20)]).toEqual([320, 180]); // IHDR width, height
      }

      // ── Cancel: stops the encoder, the page stays usable ──
      await page.locator('input[name="export-format"][value="mp4"]').check();
      await page.getByRole('combobox', { name: 'Frame range' }).selectOption('handles');
      await page.getByRole('combobox', { name: 'Size' }).selectOption('full');
      await page.getByRole('button', { name: /^Export / }).click();
      await page.getByTestId('export-stage').filter({ hasText: /Rendering|Encoding/ }).waitFor();
      await page.getByRole('button', { name: 'Cancel' }).click();
      await page.getByText('Export cancelled.').waitFor();
      expect(await page.getByRole('button', { name: /^Export / }).isEnabled()).toBe(true);
      await page.getByRole('combobox', { name: 'Size' }).selectOption('half');
      await page.getByRole('combobox', { name: 'Frame range' }).selectOption('shot');

      // Stored exports are listed with the version: by the API, and on the page.
      const listed = await sup.client.get(`/api/versions/${versionId}/exports`);
      expect(listed.body.exports.map((e: { format: string }) => e.format).sort()).toEqual(['gif', 'mp4', 'zip']);
      await page.getByTestId('export-list').locator('li').nth(2).waitFor();
      expect(await page.getByTestId('export-list').locator('li').count()).toBe(3);
      // …and the Share panel offers the stored MP4 and GIF (not the ZIP) as link targets.
      const exportTargets = page.getByRole('combobox', { name: 'Link shows' }).locator('option', { hasText: /^Export: / });
      await exportTargets.nth(1).waitFor({ state: 'attached' });
      expect(await exportTargets.count()).toBe(2);

      // ── Share link ──
      await page.getByRole('button', { name: 'Create link' }).click();
      const url = await page.getByTestId('share-url').inputValue();
      expect(url).toMatch(/\/share\/[a-z2-7]{32}$/);
      await page.getByTestId('share-links').locator('li').first().waitFor();
      await pageShot(page, 'export-share-made');
      expect(errors).toEqual([]);

      // ── A client opens it without signing in and comments ──
      const v = viewer.page;
      await v.goto(url);
      await v.getByTestId('share-slate').waitFor();
      const slate = await v.getByTestId('share-slate').textContent();
      expect(slate).toContain(shotCode);
      expect(slate).toContain('v001');
      expect(slate).toContain('Low Tide');
      expect(await v.getByTestId('share-caution').textContent()).toContain('licensed special-effects coordinator');
      await v.getByTestId('shared-canvas').waitFor();
      await v.getByLabel('Your name').fill('Robin at the agency');
      await v.getByLabel(/^Comment/).fill('Can the splash reach the railing?');
      await v.getByRole('button', { name: 'Send comment' }).click();
      await v.getByTestId('shared-sent').waitFor();
      // The sent line pairs the frame with its source timecode (SMPTE ST 12-1 hh:mm:ss:ff), not the number alone.
      expect(await v.getByTestId('shared-sent').textContent()).toMatch(new RegExp(`at frame ${FIRST} · \\d\\d:\\d\\d:\\d\\d[:;]\\d\\d\\.`));
      await screenshot(v, 'share-page-commented');
      const html = await v.content();
      expect(html).not.toContain(sup.email);
      expect(html).not.toContain(`/api/versions/${versionId}`);

      // ── …and the comment is on the version as a client note ──
      const rows = await db().select().from(notes).where(eq(notes.versionId, versionId));
      expect(rows).toHaveLength(1);
      expect(rows[0]).toMatchObject({ guestName: 'Robin at the agency', internal: false, body: 'Can the splash reach the railing?', frame: FIRST });
      const notesApi = await sup.client.get(`/api/versions/${versionId}/notes`);
      expect(notesApi.status).toBe(200);
      expect(JSON.stringify(notesApi.body)).toContain('Can the splash reach the railing?');
      const links = await sup.client.get(`/api/versions/${versionId}/share-links`);
      expect(links.body.links[0].openCount).toBe(1);

      // Back in the producer's browser: the version page lists the comment in the review panel's notes, under the
      // client's name, and the Share panel counts the open.
      await page.goto(versionPage);
      const thread = page.getByTestId('note-list').getByTestId('note-thread').filter({ hasText: 'Can the splash reach the railing?' });
      await thread.waitFor({ timeout: 15_000 });
      expect(await thread.getAttribute('data-frame')).toBe(String(FIRST));
      expect(await thread.textContent()).toContain('Robin at the agency');
      expect(await thread.textContent()).not.toContain('studio only');
      await hydrated(page, 'share-panel');
      await page.getByTestId('share-links').filter({ hasText: '1 open ' }).waitFor();
      await pageShot(page, 'export-version-page-with-client-note');
      expect(errors).toEqual([]);
    } finally {
      await viewer.close();
      await b.close();
    }
  }, 420_000);
});
