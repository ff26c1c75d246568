// Browser: an artist opens an unbaked version, bakes it, watches the progress bar reach 100 %, and the player
// appears by itself; scrub on the ruler, step with ←/→ (the frame and timecode readouts move by exactly one), and
// screenshots show the splash over the plate in both looks.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { openBrowser, screenshot, signedIn } from '../support/browser';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { uploadPngPlate } from '../support/plates';
import { closeDb, db } from '../../src/lib/server/db';
import { shots, shows } from '../../src/lib/server/db/schema';
import { rooftopPoolPlate } from '../../src/lib/server/demo-plates';
import { framesToTimecode, timecodeToFrames } from '../../src/lib/timecode';

// The source timecode of a shot frame here: the cut in (1001) is 01:00:10:00, one label per frame at 25 (SMPTE ST 12-1, non-drop).
const sourceTc = (frame: number) => framesToTimecode(timecodeToFrames('01:00:10:00', '25') + frame - 1001, '25');

let studio: TestStudio;
let versionId: number;
let shotCode: string;
const PLATE = { width: 960, height: 540 };
const TANK = { width: 1.6, height: 0.9 };

/** A pool with a block of liquid dropped into it: 48 frames at 25 fps, a few thousand particles (bakes in seconds). */
function splashScene() {
  return {
    version: 1,
    tank: { width: TANK.width, height: TANK.height, cellSize: 0.02, sides: { left: true, right: true, bottom: true, top: false } },
    timing: { fps: 25, startFrame: 1001, endFrame: 1048, substeps: 2 },
    physics: { seed: 9 },
    pours: [
      { id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1.6, height: 0.3 }, velocity: [0, 0] },
      { id: 'drop', shape: { type: 'rect', x: 0.68, y: 0.5, width: 0.24, height: 0.24 }, velocity: [0, -2.5] },
    ],
  };
}

beforeAll(async () => {
  studio = await makeStudio();
  const artist = studio.members.artist.client;
  const [show] = await db().insert(shows).values({ studioId: studio.id, code: unique('PL').slice(0, 30), name: 'Player test show', frameRate: '25' });
  shotCode = unique('SPL').slice(0, 20);
  const [shot] = await db()
    .insert(shots)
    .values({ studioId: studio.id, showId: Number(show.insertId), code: shotCode, firstFrame: 1001, lastFrame: 1048, frameRate: '25', sourceTimecodeIn: '01:00:10:00' });
  const shotId = Number(shot.insertId);

  // The plate: the painted rooftop pool, uploaded like an artist's file; the tank spans its width.
  const png = rooftopPoolPlate(PLATE.width, PLATE.height);
  await uploadPngPlate(studio, shotId, png, 'rooftop-pool.png');
  const scale = await artist.post(`/api/studios/${studio.id}/shots/${shotId}/scale`, { pixels: PLATE.width, metres: TANK.width });
  expect(scale.status, JSON.stringify(scale.body)).toBe(200);

  const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: splashScene(), comment: 'Drop into the pool' });
  expect(saved.status, JSON.stringify(saved.body)).toBe(201);
  versionId = saved.body.version.id;
}, 60_000);
afterAll(closeDb);

describe('version page and player in Chromium', () => {
  it('bakes with live progress, then scrubs, steps and shows the splash over the plate', async () => {
    const b = await openBrowser();
    try {
      const { page } = b;
      const errors = await signedIn(page, studio.members.artist);
      await page.goto(`/studios/${studio.slug}/versions/${versionId}`);

      const header = page.getByTestId('version-header');
      await header.waitFor();
      const headerText = (await header.textContent()) ?? '';
      expect(headerText).toContain(shotCode);
      expect(headerText).toContain('v001');
      expect(headerText).toContain('1001–1048');
      // The cut in is labelled with the shot's source timecode, not with frame 1001 read as timecode (00:00:40:01).
      expect(headerText).toContain('01:00:10:00 – 01:00:11:22'); // 47 frames on at 25 fps = 1 s 22 frames
      expect(headerText).not.toContain('00:00:40:01');
      expect(await page.getByTestId('bake-state').textContent()).toBe('not baked');
      await screenshot(page, 'player-unbaked');

      await page.getByRole('button', { name: 'Bake this version' }).click();
      // Watch the progress bar: it shows, moves, and reaches 100 %.
      const seen = new Set<string>();
      const bar = page.getByRole('progressbar', { name: 'Bake progress' });
      await bar.waitFor({ timeout: 15_000 });
      const until = Date.now() + 120_000;
      for (;;) {
        const now = await bar.getAttribute('aria-valuenow').catch(() => null);
        if (now !== null) seen.add(now);
        if (now === '100') break;
        if ((await page.getByTestId('bake-panel').getAttribute('data-bake-state').catch(() => null)) === 'failed') {
          throw new Error(`bake failed: ${await page.getByTestId('bake-panel').textContent()}`);
        }
        if (Date.now() > until) throw new Error(`bake progress never reached 100 % (saw ${[...seen].join(', ')})`);
        await page.waitForTimeout(150);
      }
      expect(await page.getByTestId('bake-percent').textContent()).toBe('100 %');
      expect(await page.getByTestId('bake-frames').textContent()).toContain('48 / 48 frames');
      await screenshot(page, 'player-bake-progress');

      // The player appears by itself and shows the first frame.
      const player = page.getByTestId('player');
      await page.locator('[data-testid="player"][data-status="ready"]').waitFor({ timeout: 30_000 });
      expect(await page.getByTestId('bake-state').textContent()).toBe('baked');
      expect(await page.getByTestId('frame-readout').textContent()).toBe('1001');
      const firstFrame = (await page.getByTestId('player-timing').textContent()) ?? '';
      console.log(`player: ${firstFrame}; progress values seen: ${[...seen].join(', ')}`);

      // Scrub: drag along the ruler from the first quarter to the middle.
      const ruler = page.getByTestId('timeline');
      await ruler.scrollIntoViewIfNeeded();
      const box = (await ruler.boundingBox())!;
      await page.mouse.move(box.x + box.width * 0.25, box.y + box.height / 2);
      await page.mouse.down();
      await page.mouse.move(box.x + box.width * 0.4, box.y + box.height / 2, { steps: 4 });
      await page.mouse.move(box.x + box.width * 0.5 + 2, box.y + box.height / 2, { steps: 4 });
      await page.mouse.up();
      const scrubbed = Number(await page.getByTestId('frame-readout').textContent());
      expect(scrubbed).toBeGreaterThanOrEqual(1022);
      expect(scrubbed).toBeLessThanOrEqual(1027);
      expect(await page.getByTestId('timecode-readout').textContent()).toBe(sourceTc(scrubbed));

      // Step with the arrow keys: exactly one frame each, timecode with it.
      await page.keyboard.press('ArrowRight');
      await expect.poll(async () => Number(await page.getByTestId('frame-readout').textContent())).toBe(scrubbed + 1);
      expect(await page.getByTestId('timecode-readout').textContent()).toBe(sourceTc(scrubbed + 1));
      await page.keyboard.press('ArrowLeft');
      await page.keyboard.press('ArrowLeft');
      await expect.poll(async () => Number(await page.getByTestId('frame-readout').textContent())).toBe(scrubbed - 1);
      expect(await page.getByTestId('timecode-readout').textContent()).toBe(sourceTc(scrubbed - 1));
      const shown = scrubbed - 1;

      // Screenshots of the splash over the plate, in both looks, once the frame is drawn.
      await expect.poll(async () => player.getAttribute('data-drawn-frame')).toBe(String(shown));
      await page.getByTestId('bake-stats').waitFor();
      expect(await page.getByTestId('bake-stats').locator('figure').count()).toBe(5);
      await page.evaluate(() => window.scrollTo(0, 0));
      await page.waitForTimeout(300);
      await screenshot(page, 'player-surface');
      const surfaceView = await page.getByTestId('player-view').screenshot();
      await page.getByRole('button', { name: 'Speed' }).click();
      await page.waitForTimeout(300);
      await screenshot(page, 'player-speed');
      const speedView = await page.getByTestId('player-view').screenshot();
      expect(Buffer.compare(surfaceView, speedView)).not.toBe(0);

      // Play for a moment: the playhead moves, and Space pauses (with the ruler focused, not a button).
      await ruler.focus();
      await page.keyboard.press('Space');
      await expect.poll(async () => Number(await page.getByTestId('frame-readout').textContent()), { timeout: 5_000 }).not.toBe(shown);
      await page.keyboard.press('Space');
      expect(await page.getByRole('button', { name: 'Play' }).count()).toBe(1);

      // Opening the baked version afresh (the page carries the clip's URLs): the first frame shows quickly.
      await page.reload();
      await page.locator('[data-testid="player"][data-status="ready"]').waitFor({ timeout: 30_000 });
      expect(await page.getByTestId('frame-readout').textContent()).toBe('1001');
      console.log(`player after reload: ${await page.getByTestId('player-timing').textContent()}`);

      expect(errors).toEqual([]);
    } finally {
      await b.close();
    }
  }, 240_000);
});
