// Browser: the whole review loop as four people of one studio, each in their own Chromium, moving only by clicking
// after sign-in (no address typed). The supervisor imports an EDL and assigns the shot; the artist finds it in the
// inbox, blocks, bakes and submits v001; the supervisor pins a note and sends it back; the artist opens the returned
// version from the inbox, starts "New version from this", bakes and submits v002; the supervisor's compare opens v001
// against v002 and plays both; a double-clicked Approve makes one decision; the producer (the studio's owner)
// exports an MP4 and a GIF (the slate held 1 s in both, counted with ffprobe and with omggif) and e-mails a share
// link to the client's address; the client signs in, finds the version waiting and comments; the artist and the
// supervisor get one mail each; the shot's activity lists every step in order. Screenshots: whole-loop-*.png.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { GifReader } from 'omggif';
import { answerCors, hydrated, openBrowser, screenshot, signInAs, waitForIslands } from '../support/browser';
import { MAIL, makeStudio, type CaughtMail, type TestStudio } from '../support/app';
import { closeDb, db } from '../../src/lib/server/db';
import { reviewEvents, studios, users } from '../../src/lib/server/db/schema';

// One 12-frame event at 24 fps in the CMX 3600 layout (from memory): record out is exclusive, so 01:00:00:00 to
// 01:00:00:12 is 12 frames. With no handles the shot runs 1001–1012 (first frame 1001: common practice (no source)).
const EDL = [
  'TITLE: HARBOUR WALL CUT 2',
  'FCM: NON-DROP FRAME',
  '001  B014C003 V     C        14:20:05:00 14:20:05:12 01:00:00:00 01:00:00:12',
  '* FROM CLIP NAME: HW_0040_plate_v02.mov',
].join('\n');
const CODE = 'HW_0040'; // the clip name without its plate suffixes (common practice (no source))
const FIRST = 1001;
const LAST = 1012;
// The slate is held 1 s by default in every format (common practice (no source)): 24 pictures at 24 fps.
const SLATE = 24;
// A GIF frame delay is in hundredths of a second (GIF89a, section 23): a 1 s hold is 100 cs.
const SLATE_CENTISECONDS = 100;

let studio: TestStudio;
let showId: number;
const downloads = mkdtempSync(path.join(tmpdir(), 'tidemark-whole-loop-'));

// The four people, under names of our own making (the screenshots read as a studio would see them).
const NAMES = { owner: 'Dana Whitlow', supervisor: 'Ines Aldana', artist: 'Tomas Brekke', client: 'Priya Callender' } as const;

beforeAll(async () => {
  studio = await makeStudio();
  await db().update(studios).set({ name: 'Gull Point Previs' }).where(eq(studios.id, studio.id));
  for (const role of ['owner', 'supervisor', 'artist', 'client'] as const) {
    await db().update(users).set({ name: NAMES[role] }).where(eq(users.id, studio.members[role].id));
    studio.members[role].name = NAMES[role];
  }
  const made = await studio.members.supervisor.client.post(`/api/studios/${studio.id}/shows`, { code: 'HW', name: 'Harbour Wall', frameRate: '24' });
  expect(made.status, JSON.stringify(made.body)).toBe(201);
  showId = made.body.show.id;
}, 60_000);
afterAll(async () => {
  await closeDb();
  rmSync(downloads, { recursive: true, force: true });
});

let step = 0;
/** A full-page screenshot from the top, numbered in the order of the loop. */
async function shot(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0));
  await screenshot(page, `whole-loop-${String(++step).padStart(2, '0')}-${name}`);
}

/** Signs in and waits for the studio's first page. */
async function signIn(page: Page, who: { email: string; password: string }) {
  await signInAs(page, who.email, who.password);
  await page.waitForURL(/\/studios\//);
}

/** Clicks a navigation link in the app's header. */
const nav = (page: Page, name: 'Inbox' | 'Library') => page.getByRole('navigation').getByRole('link', { name: new RegExp(`^${name}`) }).first().click();

/** Drags in the editor's view from one tank point to another (metres). */
async function drag(page: Page, from: [number, number], to: [number, number]) {
  const at = async (x: number, y: number) => {
    const p = (await page.evaluate(([x, y]) => (window as any).tidemarkEditor.toClient(x, y), [x, y])) as [number, number];
    return { x: p[0], y: p[1] };
  };
  const a = await at(...from);
  const b = await at(...to);
  await page.mouse.move(a.x, a.y);
  await page.mouse.down();
  for (let k = 1; k <= 6; k++) await page.mouse.move(a.x + ((b.x - a.x) * k) / 6, a.y + ((b.y - a.y) * k) / 6);
  await page.mouse.up();
}

/** In the editor: saves the scene as the next version, starts its bake and opens the version page; returns its id. */
async function saveBakeOpen(page: Page, comment: string, label: string): Promise<number> {
  await page.getByRole('button', { name: 'Save version…' }).click();
  await page.getByLabel('Comment').fill(comment);
  await page.getByRole('button', { name: 'Save version', exact: true }).click();
  await page.getByRole('heading', { name: `Saved as ${label}` }).waitFor();
  await page.getByRole('button', { name: 'Bake this version' }).click();
  await page.getByTestId('bake-status').waitFor();
  await shot(page, `artist-${label}-saved-baking`);
  await page.getByRole('link', { name: `Open ${label}` }).click();
  await page.waitForURL(/\/versions\/\d+$/);
  const id = Number(new URL(page.url()).pathname.split('/').pop());
  // the version page follows the bake live; the player appears once it is baked
  await expect.poll(() => page.getByTestId('bake-state').textContent(), { timeout: 120_000 }).toBe('baked');
  return id;
}

/** On a version page: submits it for review with a word for the reviewers. */
async function submit(page: Page, word: string) {
  const status = await hydrated(page, 'review-status');
  await expect.poll(() => page.getByTestId('review-panel-state').getAttribute('data-state'), { timeout: 15_000 }).toBe('draft');
  await page.getByLabel('A word for the reviewers (optional)').fill(word);
  await status.getByRole('button', { name: 'Submit for review' }).click();
  await expect.poll(() => page.getByTestId('review-panel-state').getAttribute('data-state'), { timeout: 15_000 }).toBe('submitted');
}

/** Picks a format in the Export panel, exports, and saves the download. */
async function exportAndDownload(page: Page, format: 'gif' | 'mp4'): Promise<string> {
  await page.locator(`input[name="export-format"][value="${format}"]`).check();
  await page.getByRole('button', { name: /^Export / }).click();
  await page.getByTestId('export-done').waitFor({ timeout: 120_000 });
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-download').click()]);
  const file = path.join(downloads, download.suggestedFilename());
  await download.saveAs(file);
  return file;
}

/** E-mails at the mail catcher to the address whose subject starts with `subject`. */
async function mailsTo(address: string, subject: string): Promise<CaughtMail[]> {
  const res = await fetch(`${MAIL}/api/email?to.address=${encodeURIComponent(address)}`);
  return ((await res.json()) as CaughtMail[]).filter((m) => m.subject.startsWith(subject));
}

describe('the whole loop, four people in Chromium', () => {
  it('EDL → assignment → v001 → return → v002 from the returned one → compare → approve → MP4 and GIF → share → client comment → mails and activity', async () => {
    const { supervisor, artist, owner: producer, client } = studio.members;
    const browsers = await Promise.all([openBrowser(), openBrowser(), openBrowser(), openBrowser()]);
    const [sb, ab, pb, cb] = browsers;
    const errors: string[] = [];
    try {
      for (const b of browsers) {
        await answerCors(b.context);
        b.page.on('pageerror', (e) => errors.push(`${e.message}`));
      }
      const s = sb.page;
      const a = ab.page;
      const p = pb.page;
      const c = cb.page;

      // ── The supervisor imports the cut and assigns the shot ──
      await signIn(s, supervisor);
      await s.getByRole('link', { name: 'Harbour Wall' }).first().click();
      await s.waitForURL(new RegExp(`/shows/${showId}$`));
      await s.getByRole('link', { name: 'Import EDL / CSV' }).click();
      await waitForIslands(s);
      await s.getByLabel('Edit decision list').fill(EDL);
      await s.getByLabel('Head handles').fill('0');
      await s.getByLabel('Tail handles').fill('0');
      await s.getByRole('button', { name: 'Preview' }).click();
      await s.getByTestId('import-table').waitFor();
      expect(await s.getByLabel('Code of line 3').inputValue()).toBe(CODE);
      await shot(s, 'supervisor-import-preview');
      await s.getByRole('button', { name: 'Confirm import' }).click();
      await s.getByText('Imported into HW').waitFor();
      await s.getByRole('link', { name: 'See the shots' }).click();
      await s.getByRole('link', { name: CODE }).first().click();
      await s.waitForURL(/\/shots\/\d+$/);
      const shotId = Number(new URL(s.url()).pathname.split('/').pop());
      await waitForIslands(s);
      await s.getByLabel('Assignee').selectOption({ label: artist.name });
      await expect.poll(() => s.getByTestId('activity').textContent(), { timeout: 15_000 }).toContain(`assigned the shot to ${artist.name}`);
      await shot(s, 'supervisor-shot-assigned');

      // ── The artist finds it in the inbox, blocks, bakes and submits v001 ──
      await signIn(a, artist);
      await nav(a, 'Inbox');
      const assigned = a.locator(`[data-testid="inbox-assigned-shot"][data-shot-id="${shotId}"]`);
      await assigned.waitFor();
      expect(await assigned.getAttribute('data-unread')).toBe('true');
      await shot(a, 'artist-inbox-assigned');
      await assigned.getByRole('link', { name: 'Open the shot' }).click();
      await a.waitForURL(new RegExp(`/shots/${shotId}$`));
      await a.getByRole('link', { name: 'Block a new version' }).click();
      await a.getByTestId('editor-canvas').waitFor({ timeout: 60_000 });
      await a.waitForFunction(() => (window as any).tidemarkEditor?.toClient(0, 0) !== null, undefined, { timeout: 30_000 });
      expect(await a.evaluate(() => (window as any).tidemarkEditor.doc().timing)).toMatchObject({ startFrame: FIRST, endFrame: LAST, fps: 24 });
      // a standing pool along the bottom and a block of liquid held up on the left, to fall into it
      await a.getByTestId('editor-view').focus();
      await a.keyboard.press('2');
      await drag(a, [0.02, 0.02], [1.58, 0.2]);
      await a.keyboard.press('2');
      await drag(a, [0.1, 0.3], [0.4, 0.7]);
      expect((await a.evaluate(() => (window as any).tidemarkEditor.doc().pours)).length).toBe(2);
      await shot(a, 'artist-v001-blocked');
      const v1 = await saveBakeOpen(a, 'first pass: the block drops into the pool', 'v001');
      await submit(a, 'first pass');
      await shot(a, 'artist-v001-submitted');

      // ── The supervisor notes a frame and sends v001 back ──
      await nav(s, 'Inbox');
      const toReview = s.locator(`[data-testid="inbox-to-review"] [data-version-id="${v1}"]`);
      await toReview.waitFor();
      await toReview.getByRole('link').first().click();
      await s.waitForURL(new RegExp(`/versions/${v1}$`));
      await expect.poll(() => s.getByTestId('review-panel-state').getAttribute('data-state'), { timeout: 15_000 }).toBe('submitted');
      const next = s.getByRole('button', { name: 'Next frame (→)' });
      for (let f = FIRST; f < 1005; f++) {
        await next.click();
        await expect.poll(() => s.getByTestId('frame-readout').textContent(), { timeout: 10_000 }).toBe(String(f + 1));
      }
      await expect.poll(() => s.getByTestId('composer-frame').textContent(), { timeout: 10_000 }).toBe('1005');
      await s.getByPlaceholder('What do you see on this frame?').fill('the block lands too far left');
      await s.getByRole('button', { name: 'Add note' }).click();
      await expect.poll(() => s.getByTestId('note-thread').count(), { timeout: 15_000 }).toBe(1);
      await s.getByLabel('Comment (needed to send it back)').fill('move the drop to the middle');
      await s.getByRole('button', { name: 'Send back for changes' }).click();
      await expect.poll(() => s.getByTestId('review-panel-state').getAttribute('data-state'), { timeout: 15_000 }).toBe('returned');
      await shot(s, 'supervisor-v001-returned');

      // ── The artist opens the returned version from the inbox and starts the next one from it ──
      await nav(a, 'Inbox');
      const returned = a.locator(`[data-testid="inbox-returned"] [data-version-id="${v1}"]`);
      await returned.waitFor();
      expect(await returned.textContent()).toContain('move the drop to the middle');
      // the note pinned to frame 1005 is new; marking it read on its own leaves the return new
      const newNote = a.getByTestId('inbox-note').filter({ hasText: 'the block lands too far left' });
      await newNote.waitFor();
      await shot(a, 'artist-inbox-returned');
      await newNote.getByTestId('inbox-note-mark-read').click();
      await newNote.waitFor({ state: 'detached' });
      expect(await returned.getAttribute('data-unread')).toBe('true');
      await returned.getByRole('link').first().click();
      await a.waitForURL(new RegExp(`/versions/${v1}$`));
      const banner = a.getByTestId('returned-banner');
      await banner.waitFor();
      expect(await banner.textContent()).toContain('move the drop to the middle');
      await expect.poll(() => a.getByTestId('note-thread').count(), { timeout: 15_000 }).toBe(1);
      await shot(a, 'artist-returned-version');
      await banner.getByTestId('new-version-from-this').click();
      await a.waitForURL(new RegExp(`/shots/${shotId}/edit\\?from=${v1}$`));
      await a.getByTestId('editor-canvas').waitFor({ timeout: 60_000 });
      await a.waitForFunction(() => (window as any).tidemarkEditor?.toClient(0, 0) !== null, undefined, { timeout: 30_000 });
      const fromV1 = await a.evaluate(() => (window as any).tidemarkEditor.doc().pours);
      expect(fromV1).toHaveLength(2); // v001's scene
      // the block moves to the middle: picked and dragged 0.55 m to the right
      await a.getByTestId('editor-view').focus();
      await a.keyboard.press('1');
      await drag(a, [0.25, 0.5], [0.8, 0.5]);
      const moved = await a.evaluate(() => (window as any).tidemarkEditor.doc().pours);
      expect(moved).toHaveLength(2);
      expect(moved[1].shape.x).toBeCloseTo(0.65, 1);
      await shot(a, 'artist-v002-blocked');
      const v2 = await saveBakeOpen(a, 'the drop in the middle', 'v002');
      // saved, not submitted: v001 still waits in the inbox as sent back, and leads to v002
      await nav(a, 'Inbox');
      const stillReturned = a.locator(`[data-testid="inbox-returned"] [data-version-id="${v1}"]`);
      await stillReturned.waitFor();
      const nextLine = stillReturned.getByTestId('inbox-next-version');
      expect(await nextLine.textContent()).toContain('v002 saved since');
      await shot(a, 'artist-inbox-returned-after-saving');
      await nextLine.getByRole('link', { name: 'v002' }).click();
      await a.waitForURL(new RegExp(`/versions/${v2}$`));
      await submit(a, 'moved to the middle');
      await shot(a, 'artist-v002-submitted');
      await nav(a, 'Inbox');
      await a.getByTestId('inbox-returned').waitFor();
      expect(await a.locator(`[data-testid="inbox-returned"] [data-version-id="${v1}"]`).count()).toBe(0); // answered

      // ── The supervisor compares the returned and the new version, plays both, and approves ──
      await nav(s, 'Inbox');
      const second = s.locator(`[data-testid="inbox-to-review"] [data-version-id="${v2}"]`);
      await second.waitFor();
      await second.getByRole('link').first().click();
      await s.waitForURL(new RegExp(`/versions/${v2}$`));
      await s.getByTestId('compare-link').click();
      await s.waitForURL(new RegExp(`/compare\\?a=${v1}&b=${v2}$`));
      expect(await s.getByTestId('compare-pick-a').inputValue()).toBe(String(v1));
      expect(await s.getByTestId('compare-pick-b').inputValue()).toBe(String(v2));
      // v001 reads as sent back, though saving v002 superseded it
      expect(await s.getByTestId('compare-pick-a').locator('option:checked').textContent()).toBe('v001 · Sent back, then replaced');
      await hydrated(s, 'compare-view');
      await s.getByTestId('compare-mode-side').click();
      expect(await s.getByTestId('compare-view').getAttribute('data-mode')).toBe('side');
      await expect.poll(() => s.getByTestId('compare-frame-number').textContent(), { timeout: 30_000 }).toBe(String(FIRST));
      await s.waitForTimeout(300);
      const sidesAt = async () => [await s.getByTestId('compare-a').screenshot(), await s.getByTestId('compare-b').screenshot()];
      const before = await sidesAt();
      await shot(s, 'supervisor-compare-first-frame');
      await s.locator('body').press('Space');
      await expect.poll(async () => Number(await s.getByTestId('compare-frame-number').textContent()), { timeout: 15_000 }).toBeGreaterThan(FIRST + 4);
      await s.locator('body').press('Space');
      await s.waitForTimeout(300);
      const after = await sidesAt();
      // both sides moved on: each side's picture changed while playing
      expect(Buffer.compare(before[0], after[0])).not.toBe(0);
      expect(Buffer.compare(before[1], after[1])).not.toBe(0);
      await shot(s, 'supervisor-compare-played');
      await s.locator(`[data-testid="compare-view"]`).waitFor();
      await s.getByRole('link', { name: 'v002', exact: true }).click();
      await s.waitForURL(new RegExp(`/versions/${v2}`));
      const status = await hydrated(s, 'review-status');
      let decideCalls = 0;
      s.on('request', (r) => r.url().endsWith(`/api/versions/${v2}/review/decide`) && decideCalls++);
      await status.getByRole('button', { name: 'Approve' }).dblclick();
      await expect.poll(() => s.getByTestId('review-panel-state').getAttribute('data-state'), { timeout: 15_000 }).toBe('approved');
      await status.getByRole('status').filter({ hasText: 'Approved.' }).waitFor();
      await s.waitForTimeout(800);
      expect(await status.getByRole('alert').count()).toBe(0);
      expect(decideCalls).toBe(1);
      const approvals = (await db().select().from(reviewEvents).where(eq(reviewEvents.versionId, v2))).filter((e) => e.toState === 'approved');
      expect(approvals).toHaveLength(1);
      await shot(s, 'supervisor-v002-approved');

      // ── The producer exports an MP4 and a GIF, then e-mails a share link to the client ──
      await signIn(p, producer);
      await p.getByRole('link', { name: 'Harbour Wall' }).first().click();
      await p.getByRole('link', { name: CODE }).first().click();
      await p.waitForURL(new RegExp(`/shots/${shotId}$`));
      await p.getByTestId('versions').getByRole('link').first().click(); // newest first: v002
      await p.waitForURL(new RegExp(`/versions/${v2}$`));
      const exportPanel = p.getByTestId('export-panel');
      await exportPanel.scrollIntoViewIfNeeded();
      await hydrated(p, 'export-panel');
      await p.getByRole('combobox', { name: 'Size' }).selectOption('width');
      await p.getByLabel('Width in pixels').fill('320');
      expect(await p.getByTestId('slate-frames').textContent()).toContain(`${SLATE} frames`);
      const mp4 = await exportAndDownload(p, 'mp4');
      await shot(p, 'producer-mp4-exported');
      const gifFile = await exportAndDownload(p, 'gif');
      await shot(p, 'producer-gif-exported');

      // The MP4's slate counted with ffprobe: signalstats' YDIF is each picture's mean luma difference from the one
      // before (FFmpeg filters documentation, "signalstats"); the slate pictures repeat one picture, the shot's
      // first frame is a new one.
      const frames = JSON.parse(
        execFileSync('ffprobe', ['-v', 'error', '-f', 'lavfi', '-i', `movie=${mp4},signalstats`, '-show_entries', 'frame_tags=lavfi.signalstats.YDIF', '-of', 'json']).toString(),
      ).frames as { tags: Record<string, string> }[];
      expect(frames).toHaveLength(SLATE + LAST - FIRST + 1);
      const ydif = frames.map((f) => Number(f.tags['lavfi.signalstats.YDIF']));
      const firstChange = ydif.findIndex((d, i) => i > 0 && d > 1);
      expect(firstChange).toBe(SLATE); // pictures 0–23 are the slate: 24 pictures at 24 fps, 1 s
      expect(ydif.slice(1, SLATE).every((d) => d < 1)).toBe(true);
      const rate = execFileSync('ffprobe', ['-v', 'error', '-select_streams', 'v:0', '-show_entries', 'stream=r_frame_rate', '-of', 'csv=p=0', mp4]).toString().trim();
      expect(rate).toBe('24/1');

      // The GIF's slate counted with omggif (not the encoder's own code): frames that repeat the first picture, and
      // their delays add up to 1 s.
      const gif = new GifReader(new Uint8Array(readFileSync(gifFile)));
      const pixels = (i: number) => {
        const px = new Uint8Array(gif.width * gif.height * 4);
        gif.decodeAndBlitFrameRGBA(i, px);
        return px;
      };
      const slatePicture = pixels(0);
      const same = (px: Uint8Array) => {
        let diff = 0;
        for (let i = 0; i < px.length; i += 4) diff += Math.abs(px[i] - slatePicture[i]) + Math.abs(px[i + 1] - slatePicture[i + 1]) + Math.abs(px[i + 2] - slatePicture[i + 2]);
        return diff / ((px.length / 4) * 3) < 2;
      };
      const gifSlate = Array.from({ length: gif.numFrames() }, (_, i) => i).filter((i) => same(pixels(i)));
      expect(gifSlate).toEqual(Array.from({ length: SLATE }, (_, i) => i));
      expect(gifSlate.reduce((sum, i) => sum + gif.frameInfo(i).delay, 0)).toBe(SLATE_CENTISECONDS);

      const sharePanel = await hydrated(p, 'share-panel');
      await sharePanel.getByLabel('E-mail it to (optional)').fill(client.email);
      await sharePanel.getByRole('button', { name: 'Create link' }).click();
      await sharePanel.getByText(`E-mailed to ${client.email}.`).waitFor();
      await shot(p, 'producer-shared');

      // ── The client signs in, finds the version waiting, and comments on a frame ──
      await signIn(c, client);
      const waiting = c.getByTestId('client-waiting');
      await waiting.waitFor();
      expect(await waiting.textContent()).toContain(`${CODE} v002`);
      await shot(c, 'client-home-waiting');
      await waiting.getByRole('link', { name: `${CODE} v002` }).click();
      await c.waitForURL(new RegExp(`/versions/${v2}$`));
      await c.locator('[data-testid="player"][data-status="ready"]').waitFor({ timeout: 60_000 });
      const cNext = c.getByRole('button', { name: 'Next frame (→)' });
      for (let f = FIRST; f < 1008; f++) {
        await cNext.click();
        await expect.poll(() => c.getByTestId('frame-readout').textContent(), { timeout: 10_000 }).toBe(String(f + 1));
      }
      await expect.poll(() => c.getByTestId('composer-frame').textContent(), { timeout: 10_000 }).toBe('1008');
      const composer = await hydrated(c, 'note-composer');
      await composer.getByPlaceholder('What do you see on this frame?').fill('Lovely. Could the spray be a touch lower?');
      await composer.getByRole('button', { name: 'Add note' }).click();
      await expect.poll(() => c.getByTestId('note-thread').count(), { timeout: 15_000 }).toBe(1);
      await shot(c, 'client-commented');

      // ── The artist and the supervisor each get one mail about the comment ──
      for (const who of [artist, supervisor]) {
        await expect.poll(async () => (await mailsTo(who.email, 'Client comment')).length, { timeout: 20_000 }).toBe(1);
        const [mail] = await mailsTo(who.email, 'Client comment');
        expect(mail.text).toContain('Could the spray be a touch lower?');
        expect(mail.text).toContain('from their client account');
      }
      await new Promise((r) => setTimeout(r, 1500));
      for (const who of [artist, supervisor]) expect(await mailsTo(who.email, 'Client comment')).toHaveLength(1);

      // ── The shot's activity lists every step of the loop, in order ──
      await s.getByTestId('version-shot-link').click();
      await s.waitForURL(new RegExp(`/shots/${shotId}$`));
      await s.getByTestId('activity').waitFor();
      const lines = (await s.getByTestId('activity').locator('li').evaluateAll((els) => els.map((e) => e.firstChild?.textContent ?? ''))).reverse();
      expect(lines).toEqual([
        `${supervisor.name} created the shot from an edit list import`,
        `${supervisor.name} assigned the shot to ${artist.name}`,
        `${artist.name} saved v001`,
        `v001 baked (bake asked for by ${artist.name})`,
        `${artist.name} submitted v001 for review: “first pass”`,
        `${supervisor.name} sent v001 back for changes: “move the drop to the middle”`,
        `${artist.name} saved v002`,
        `v002 baked (bake asked for by ${artist.name})`,
        `${artist.name} submitted v002 for review: “moved to the middle”`,
        `${supervisor.name} approved v002`,
        `${producer.name} exported v002 as MP4`,
        `${producer.name} exported v002 as GIF`,
        `${producer.name} made a share link for v002`,
        `${producer.name} e-mailed the share link for v002 to ${client.email}`,
        `${client.name} commented on v002 at frame 1008 (client account)`,
      ]);
      await s.getByTestId('activity').scrollIntoViewIfNeeded();
      await shot(s, 'supervisor-shot-activity');
      expect(errors).toEqual([]);
    } finally {
      for (const b of browsers) await b.close();
    }
  }, 600_000);
});
