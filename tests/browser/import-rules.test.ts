// Browser: the import preview says what it will do — sound and black events listed as skipped with the reason, the
// default code from the clip name without plate suffixes in an input to adjust, an approved shot's range change
// flagged and applied only when ticked — and a 120-character unbroken show name stays inside the library table and
// the show page. The edit list is written in the CMX 3600 layout (from memory); plate suffixes are common practice
// (no source).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { openBrowser, screenshot as fullScreenshot, signInAs, waitForIslands } from '../support/browser';
import { makeStudio, type TestStudio } from '../support/app';
import { closeDb, db } from '../../src/lib/server/db';
import { shots, shows } from '../../src/lib/server/db/schema';

const EDL = [
  'TITLE: PIER RUN CUT 5',
  'FCM: NON-DROP FRAME',
  '001  A030C001 V     C        11:00:00:00 11:00:02:00 01:00:00:00 01:00:02:00', // line 3
  '* FROM CLIP NAME: PR_0010_plate_v03.exr',
  '002  A030C002 A     C        11:10:00:00 11:10:02:00 01:00:00:00 01:00:02:00', // line 5: sound only
  '* FROM CLIP NAME: PR_0010_surf.wav',
  '003  BL       V     C        00:00:00:00 00:00:00:12 01:00:02:00 01:00:02:12', // line 7: black
  '004  A030C003 V     C        11:20:00:00 11:20:01:12 01:00:02:12 01:00:04:00', // line 8
  '* FROM CLIP NAME: PR_0020_bg.mov',
].join('\n');

async function screenshot(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0));
  await fullScreenshot(page, name);
}

/** Whether the page scrolls sideways (something wider than the window). */
const overflowsSideways = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth > document.documentElement.clientWidth + 1);

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

describe('import preview in Chromium', () => {
  it('lists skipped events, offers the cleaned code to adjust, and needs a tick for an approved shot', async () => {
    const longName = 'Pierrunwaveovertoppingthebreakwateratdusk'.repeat(3).slice(0, 120);
    const [s] = await db().insert(shows).values({ studioId: studio.id, code: 'PR', name: longName, frameRate: '24' });
    const showId = Number(s.insertId);
    // PR_0020 exists, approved, 1009–1040; the edit makes it 1009–1044 (36 frames at 24 fps from cut in 1009).
    const [shot] = await db().insert(shots).values({ studioId: studio.id, showId, code: 'PR_0020', firstFrame: 1009, lastFrame: 1040, headHandles: 8, tailHandles: 8, status: 'approved' });
    const approvedId = Number(shot.insertId);
    const b = await openBrowser();
    try {
      const { page } = b;
      await signInAs(page, studio.members.supervisor.email, studio.members.supervisor.password);
      await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));

      // The long name stays inside the library table and the show page.
      await page.goto(`/studios/${studio.slug}/`);
      await page.getByTestId('library').waitFor();
      await waitForIslands(page);
      const nameLink = page.locator(`a[title="${longName}"]`).first();
      await nameLink.waitFor();
      expect(await overflowsSideways(page)).toBe(false);
      expect(await nameLink.evaluate((a) => a.scrollWidth > a.clientWidth)).toBe(true); // cut with an ellipsis, the tooltip holds it all
      await screenshot(page, 'import-long-name-library');
      await page.goto(`/studios/${studio.slug}/shows/${showId}`);
      await page.getByRole('heading', { level: 1 }).waitFor();
      expect(await overflowsSideways(page)).toBe(false);
      await screenshot(page, 'import-long-name-show');

      await page.goto(`/studios/${studio.slug}/shows/${showId}/import`);
      await waitForIslands(page);
      await page.getByLabel('Edit decision list').fill(EDL);
      await page.getByLabel('Head handles').fill('8');
      await page.getByLabel('Tail handles').fill('8');
      await page.getByRole('button', { name: 'Preview' }).click();
      const table = page.getByTestId('import-table');
      await table.waitFor();
      const skipped = page.getByTestId('import-skipped');
      await skipped.waitFor();
      expect(await skipped.locator('li').allTextContents()).toEqual([
        expect.stringMatching(/^Line 5, event 002 \(PR_0010_surf\.wav\): skipped, sound only \(track A\)/),
        expect.stringMatching(/^Line 7, event 003: skipped, black \(reel BL\)/),
      ]);
      // The default code has the plate suffixes removed and can be changed before the import.
      const code = page.getByLabel('Code of line 3');
      expect(await code.inputValue()).toBe('PR_0010');
      await page.getByTestId('import-approved-warning').waitFor();
      const approvedRow = table.locator('tr[data-approved="true"]');
      expect(await approvedRow.textContent()).toContain('PR_0020');
      // A fresh preview is not stale: it can be confirmed as it is.
      expect(await page.getByRole('button', { name: 'Preview again' }).count()).toBe(0);
      expect(await overflowsSideways(page)).toBe(false);
      await screenshot(page, 'import-preview-rules');

      await code.fill('PR_0015');
      await page.getByRole('button', { name: 'Preview again' }).click();
      await page.getByRole('button', { name: 'Preview again' }).waitFor({ state: 'detached' });
      expect(await page.getByLabel('Code of line 3').inputValue()).toBe('PR_0015');
      await approvedRow.getByLabel('Approved shot: change its range anyway').check();
      await screenshot(page, 'import-preview-ticked');
      await page.getByRole('button', { name: 'Confirm import' }).click();
      await page.getByText('Imported into PR').waitFor();
      const rows = await db().select().from(shots).where(eq(shots.showId, showId)).orderBy(shots.code);
      expect(rows.map((r) => [r.code, r.firstFrame, r.lastFrame])).toEqual([
        ['PR_0015', 1009, 1056],
        ['PR_0020', 1009, 1044],
      ]);
      expect(rows.find((r) => r.id === approvedId)?.status).toBe('approved');
      await screenshot(page, 'import-done');
    } finally {
      await b.close();
    }
  });
});
