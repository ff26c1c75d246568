// Browser: an artist makes a prop free with a density, adds thick paint from the liquid presets, has a spout pour it,
// saves a version, reloads the editor and finds every value kept; the live preview then shows the free prop falling.
// Screenshots in test-results/screenshots/editor-liquids-*.png.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { openBrowser, screenshot, signInAs } from '../support/browser';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { uploadPngPlate } from '../support/plates';
import { db, closeDb } from '../../src/lib/server/db';
import { shots, shows } from '../../src/lib/server/db/schema';
import { rooftopPoolPlate } from '../../src/lib/server/demo-plates';
import { liquidPreset } from '../../src/lib/scene/liquids';

let studio: TestStudio;
let shotId: number;

beforeAll(async () => {
  studio = await makeStudio();
  const [show] = await db().insert(shows).values({ studioId: studio.id, code: unique('LQ').slice(0, 12), name: 'Liquids show', frameRate: '24' });
  const [shot] = await db().insert(shots).values({
    studioId: studio.id, showId: Number(show.insertId), code: unique('PAINT'), firstFrame: 1001, lastFrame: 1030, frameRate: '24', plateWidth: 960, plateHeight: 540,
  });
  shotId = Number(shot.insertId);
  const bytes = rooftopPoolPlate(960, 540);
  const artist = studio.members.artist.client;
  await uploadPngPlate(studio, shotId, bytes, 'plate.png');
  await db().update(shots).set({ metresPerPixel: 1.6 / 960 }).where(eq(shots.id, shotId));
});
afterAll(closeDb);

type Doc = {
  liquids: { id: string; name: string; colour: string; viscosity: number }[];
  pours: { id: string; liquid: string }[];
  spouts: { id: string; liquid: string }[];
  props: { id: string; motion: string; density?: number; shape: { x: number; y: number; width: number; height: number } }[];
};
const docOf = (page: Page) => page.evaluate(() => (window as any).tidemarkEditor.doc()) as Promise<Doc>;
const at = async (page: Page, x: number, y: number) => {
  const p = (await page.evaluate(([x, y]) => (window as any).tidemarkEditor.toClient(x, y), [x, y])) as [number, number];
  return { x: p[0], y: p[1] };
};
async function drag(page: Page, from: [number, number], to: [number, number]) {
  const a = await at(page, ...from), b = await at(page, ...to);
  await page.mouse.move(a.x, a.y);
  await page.mouse.down();
  for (let k = 1; k <= 6; k++) await page.mouse.move(a.x + ((b.x - a.x) * k) / 6, a.y + ((b.y - a.y) * k) / 6);
  await page.mouse.up();
}

describe('free props and liquids in the editor', () => {
  it('keeps a free prop, a thick-paint liquid and the spout that pours it across save and reload', async () => {
    const b = await openBrowser();
    const errors: string[] = [];
    b.page.on('pageerror', (e) => errors.push(e.message));
    try {
      const { page } = b;
      const thick = liquidPreset('thick-paint')!;
      await signInAs(page, studio.members.artist.email, studio.members.artist.password);
      await page.waitForURL(new RegExp(`/studios/${studio.slug}/`));
      await page.goto(`/studios/${studio.slug}/shots/${shotId}/edit`);
      await page.locator('astro-island:not([ssr]) [data-testid=editor-canvas]').waitFor({ timeout: 60_000 });

      // A pool, and a box above it made free at 350 kg/m³ (floats about a third under).
      await page.getByTestId('editor-view').focus();
      await page.keyboard.press('2');
      await drag(page, [0.02, 0.02], [1.58, 0.3]);
      await page.keyboard.press('5');
      await drag(page, [0.6, 0.62], [0.76, 0.74]);
      await page.getByRole('radio', { name: /^Free/ }).check();
      await page.getByTestId('prop-density').fill('350');
      await page.getByTestId('prop-density').press('Enter');
      await expect.poll(async () => (await docOf(page)).props[0]?.density).toBe(350);
      expect(await page.getByTestId('prop-motion').locator('..').textContent()).toMatch(/Floats: at rest about 35 % of it sits under the surface/);
      // Out of range: said in words, the document keeps 350.
      await page.getByTestId('prop-density').fill('30000');
      await page.getByTestId('prop-density').press('Enter');
      await page.getByText('At most 20000').waitFor();
      expect((await docOf(page)).props[0].density).toBe(350);
      await page.getByTestId('prop-density').press('Escape');

      // Liquids: thick paint from the presets, with its value and source on screen.
      await page.getByRole('tab', { name: 'Liquids' }).click();
      expect(await page.getByTestId('liquid-density').textContent()).toMatch(/All liquids share one density: 1,000 kg\/m³ \(water\)/);
      const presets = page.getByTestId('liquid-presets');
      expect(await presets.textContent()).toContain(thick.source);
      expect(await presets.textContent()).toMatch(/Thick paint\s*ν = 10⁻² m²\/s/);
      await page.getByRole('button', { name: 'Add Thick paint' }).click();
      await page.getByTestId('liquid-thick-paint').waitFor();
      let doc = await docOf(page);
      expect(doc.liquids.map((l) => l.id)).toEqual(['water', 'thick-paint']);
      expect(doc.liquids[1]).toMatchObject({ name: thick.name, viscosity: thick.viscosity, colour: thick.colour });
      // Water still feeds the pool: it can't be removed, and the panel says why.
      const water = page.getByTestId('liquid-water');
      expect(await water.getByRole('button', { name: 'Remove' }).isDisabled()).toBe(true);
      expect(await water.getByTestId('liquid-keep-reason').textContent()).toMatch(/Standing liquid “standing-liquid-1” uses it: pick another liquid there before removing it/);
      await page.getByTestId('liquid-thick-paint').getByLabel('Liquid name').fill('Red paint');
      await page.getByTestId('liquid-thick-paint').getByLabel('Liquid name').press('Enter');
      await expect.poll(async () => (await docOf(page)).liquids[1].name).toBe('Red paint');

      // A spout over the pool pours the paint.
      await page.getByRole('tab', { name: 'Inspector' }).click();
      await page.getByTestId('editor-view').focus();
      await page.keyboard.press('3');
      await drag(page, [0.25, 0.62], [0.31, 0.68]);
      await page.getByLabel('Liquid', { exact: true }).selectOption({ label: 'Red paint' });
      await expect.poll(async () => (await docOf(page)).spouts[0]?.liquid).toBe('thick-paint');
      await page.getByRole('tab', { name: 'Liquids' }).click();
      expect(await page.getByTestId('liquid-thick-paint').getByRole('button', { name: 'Remove' }).isDisabled()).toBe(true);
      expect(await page.getByTestId('liquid-thick-paint').getByTestId('liquid-keep-reason').textContent()).toMatch(/Spout “spout-1” uses it/);
      await page.waitForTimeout(200);
      await screenshot(page, 'editor-liquids-1-liquids-panel');

      // Save, reload: everything kept.
      await page.getByRole('button', { name: 'Save version…' }).click();
      await page.getByLabel('Comment').fill('Free box, red paint spout');
      await page.getByRole('button', { name: 'Save version', exact: true }).click();
      await page.getByRole('heading', { name: 'Saved as v001' }).waitFor();
      await page.goto(`/studios/${studio.slug}/shots/${shotId}/edit`);
      await page.locator('astro-island:not([ssr]) [data-testid=editor-canvas]').waitFor({ timeout: 60_000 });
      expect(await page.getByText('From v001').count()).toBe(1);
      doc = await docOf(page);
      expect(doc.props[0]).toMatchObject({ motion: 'free', density: 350 });
      expect(doc.liquids[1]).toMatchObject({ id: 'thick-paint', name: 'Red paint', viscosity: thick.viscosity });
      expect(doc.spouts[0].liquid).toBe('thick-paint');
      expect(doc.pours[0].liquid).toBe('water');
      // and on screen: pick the prop, the Inspector shows it free at 350; the spout shows its paint.
      await page.keyboard.press('1');
      const box = doc.props[0].shape;
      const propAt = await at(page, box.x + box.width / 2, box.y + box.height / 2);
      await page.mouse.click(propAt.x, propAt.y);
      expect(await page.getByRole('radio', { name: /^Free/ }).isChecked()).toBe(true);
      expect(await page.getByTestId('prop-density').inputValue()).toBe('350');
      await screenshot(page, 'editor-liquids-2-reloaded-prop');
      await page.getByRole('tab', { name: 'Liquids' }).click();
      expect(await page.getByTestId('liquid-thick-paint').getByLabel('Liquid name').inputValue()).toBe('Red paint');

      // The live preview drops the free box into the pool.
      await page.getByTestId('preview-resolution').selectOption('4');
      await page.getByRole('button', { name: 'Play' }).click();
      await page.waitForFunction(() => Number(document.querySelector('[data-testid=preview-stats]')?.getAttribute('data-computed')) >= 1014, null, { timeout: 90_000 });
      await page.getByRole('button', { name: 'Pause' }).click();
      const ruler = (await page.getByTestId('frame-ruler').boundingBox())!;
      await page.mouse.click(ruler.x + ((1014 - 1001) / 29) * ruler.width, ruler.y + ruler.height / 2);
      await expect.poll(() => page.getByTestId('current-frame').textContent()).toBe('1014');
      await page.evaluate(() => window.scrollTo(0, 0));
      await page.waitForTimeout(200);
      await screenshot(page, 'editor-liquids-3-preview-free-prop');

      // Unsaved work offered back after a reload: the bar lies over the view and does not move the canvas.
      await page.getByTestId('editor-view').focus();
      await page.keyboard.press('Control+d');
      await expect.poll(async () => (await docOf(page)).props.length).toBe(2);
      await page.waitForTimeout(700);
      await page.reload();
      await page.getByTestId('draft-offer').waitFor({ timeout: 60_000 });
      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, 'editor-liquids-4-restore-bar');
      await page.evaluate(() => window.scrollTo(0, 0));
      const withBar = await page.getByTestId('editor-canvas').boundingBox();
      await page.getByRole('button', { name: 'Discard' }).click();
      await page.getByTestId('draft-offer').waitFor({ state: 'detached' });
      expect(await page.getByTestId('editor-canvas').boundingBox()).toEqual(withBar);
      expect((await docOf(page)).props).toHaveLength(1);
      expect(errors).toEqual([]);
    } finally {
      await b.close();
    }
  }, 240_000);
});
