// Browser: a producer (supervisor) opens a show whose cut came from an EDL, reads what the turnover ZIP contains
// (the edit list and one MP4 per approved shot, the approved shot without an MP4 named as missing) and downloads it.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { eq } from 'drizzle-orm';
import { unzipSync, strFromU8 } from 'fflate';
import { openBrowser, screenshot, signInAs } from '../support/browser';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { QUAY_CUT, fakeMp4, addMp4, addVersion } from '../support/turnover';
import { closeDb, db } from '../../src/lib/server/db';
import { shots, versions } from '../../src/lib/server/db/schema';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

describe('turnover on the show page', () => {
  it('shows the ZIP contents and the missing MP4, and downloads the ZIP', async () => {
    const sup = studio.members.supervisor;
    const made = await sup.client.post(`/api/studios/${studio.id}/shows`, { code: unique('BT').slice(0, 14), name: 'Quay', frameRate: '24' });
    const show = made.body.show as { id: number; code: string };
    const imported = await sup.client.post(`/api/studios/${studio.id}/shows/${show.id}/import/confirm`, { format: 'edl', text: QUAY_CUT, options: { codeFrom: 'clip', headHandles: 8, tailHandles: 8 } });
    expect(imported.status, JSON.stringify(imported.body)).toBe(200);
    const [a, b] = await db().select().from(shots).where(eq(shots.showId, show.id)).orderBy(shots.recordIn);
    const a1 = await addVersion(studio, a.id, 1, 'approved');
    await addVersion(studio, b.id, 1, 'approved');
    const mp4 = fakeMp4('browser');
    await addMp4(studio, a1, a.id, `${a.code}_v001.mp4`, mp4);

    const { page, close } = await openBrowser();
    try {
      await signInAs(page, sup.email, sup.password);
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      await page.goto(`/studios/${studio.slug}/shows/${show.id}`);
      const panel = page.getByTestId('turnover');
      await panel.scrollIntoViewIfNeeded();
      await expect.poll(() => page.getByTestId('turnover-contents').innerText()).toContain(`${a.code}_v001.mp4`);
      const contents = await page.getByTestId('turnover-contents').innerText();
      expect(contents).toContain(`${show.code}_turnover.edl`);
      expect(contents).toContain('record 01:00:00:00–01:00:02:00');
      expect(await page.getByTestId('turnover-missing').innerText()).toMatch(new RegExp(`${b.code} v001: no MP4 export of v001`));
      await screenshot(page, 'turnover-panel');
      const [download] = await Promise.all([page.waitForEvent('download'), panel.getByRole('link', { name: /Download/ }).click()]);
      expect(download.suggestedFilename()).toBe(`${show.code}_turnover.zip`);
      const files = unzipSync(new Uint8Array(readFileSync((await download.path())!)));
      expect(Object.keys(files).sort()).toEqual([`${a.code}_v001.mp4`, `${show.code}_turnover.edl`, 'contents.txt'].sort());
      expect(files[`${a.code}_v001.mp4`]).toEqual(mp4);
      expect(strFromU8(files[`${show.code}_turnover.edl`])).toContain(`* FROM CLIP NAME: ${a.code}_v001.mp4`);

      // Only what the client signed off: nothing yet, then a's version once the client signed it off.
      await panel.getByLabel('Versions to include').selectOption('client');
      await expect.poll(() => page.getByTestId('turnover-contents').innerText()).toContain('nothing yet');
      await db().update(versions).set({ clientState: 'signed off' }).where(eq(versions.id, a1));
      await page.reload();
      await page.getByTestId('turnover').scrollIntoViewIfNeeded();
      await page.locator('astro-island:not([ssr]) [data-testid="turnover"]').waitFor({ timeout: 30_000 });
      await page.getByTestId('turnover').getByLabel('Versions to include').selectOption('client');
      await expect.poll(() => page.getByTestId('turnover-contents').innerText()).toContain(`${a.code}_v001.mp4`);
      await screenshot(page, 'turnover-panel-client-signed-off');
    } finally {
      await close();
    }
  }, 60_000);
});
