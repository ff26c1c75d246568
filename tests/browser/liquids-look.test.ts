// Browser: the harbour-steps demo scene (red paint running down steps into harbour water, LHK_0300's scene from the
// demo seed) baked and opened in the player: the two liquids keep their colours on the GPU path, the steps (walls)
// are outlined, and the player's wall button hides them for a plate that already shows them.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { countPixels, openBrowser, openPlayerAt, screenshot, signedIn } from '../support/browser';
import { bakeAndWait } from '../support/bake';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { closeDb, db } from '../../src/lib/server/db';
import { shots, shows } from '../../src/lib/server/db/schema';
import { demoScene } from '../../src/lib/server/seed';

let studio: TestStudio;
let versionId: number;
const FIRST = 1001, LAST = 1036, SHOWN = 1030;

beforeAll(async () => {
  studio = await makeStudio();
  const artist = studio.members.artist.client;
  const [show] = await db().insert(shows).values({ studioId: studio.id, code: unique('LHK').slice(0, 30), name: 'Liquids look test', frameRate: '24' });
  const [shot] = await db()
    .insert(shots)
    .values({ studioId: studio.id, showId: Number(show.insertId), code: unique('LHK_0300').slice(0, 20), firstFrame: FIRST, lastFrame: LAST, frameRate: '24' });
  // Foam and spray off: their white dots have the wall line's colour, and this test counts wall-line pixels
  // (foam is checked in hero-look.test.ts and the foam tests).
  const scene = structuredClone(demoScene('LHK_0300', 24, FIRST, LAST)!.scene) as { look?: Record<string, unknown> };
  scene.look = { ...(scene.look ?? {}), foam: 0 };
  const saved = await artist.post(`/api/shots/${Number(shot.insertId)}/versions`, { scene, comment: 'Paint down the steps' });
  expect(saved.status, JSON.stringify(saved.body)).toBe(201);
  versionId = saved.body.version.id;
  await bakeAndWait(artist, versionId, 420_000);
}, 480_000);
afterAll(closeDb);

// Paint (#C8341E shaded) is red over blue; the water (#3A8FB7 shaded) blue over red; the wall line is a pale sand.
const paint = (r: number, g: number, b: number) => r > 90 && r > 2 * b && r > 1.8 * g;
const water = (r: number, g: number, b: number) => b > 80 && b > r + 40;
const wallLine = (r: number, g: number, b: number) => r > 200 && g > 190 && b > 170 && r - b < 50;

describe('two liquids and walls in the player', () => {
  it('keeps each liquid in its colour, outlines the steps, and hides them on request', async () => {
    const b = await openBrowser();
    try {
      const { page } = b;
      const errors = await signedIn(page, studio.members.artist);
      await openPlayerAt(page, studio.slug, versionId, SHOWN);
      await screenshot(page, 'liquids-look-two-liquids');
      const view = await page.getByTestId('player-view').screenshot({ path: 'test-results/screenshots/liquids-look-two-liquids-view.png' });
      const box = (await page.getByTestId('player-view').boundingBox())!;
      const area = box.width * box.height;
      const counts = { paint: countPixels(view, paint), water: countPixels(view, water), wall: countPixels(view, wallLine) };
      console.log(`liquids look at ${box.width}×${box.height}: ${JSON.stringify(counts)}`);
      expect(counts.paint).toBeGreaterThan(area * 0.01);
      expect(counts.water).toBeGreaterThan(area * 0.01);
      // Three steps outlined 2 px wide: well over a thousand pixels of line.
      expect(counts.wall).toBeGreaterThan(1000);

      await page.getByRole('button', { name: 'Walls shown' }).click();
      await expect.poll(async () => page.getByRole('button', { name: 'Walls hidden' }).count()).toBe(1);
      await page.waitForTimeout(300);
      const hidden = await page.getByTestId('player-view').screenshot({ path: 'test-results/screenshots/liquids-look-walls-hidden-view.png' });
      expect(countPixels(hidden, wallLine)).toBeLessThan(counts.wall * 0.2);
      expect(countPixels(hidden, paint)).toBeGreaterThan(counts.paint * 0.9); // the liquids stay
      expect(errors).toEqual([]);
    } finally {
      await b.close();
    }
  }, 240_000);
});
