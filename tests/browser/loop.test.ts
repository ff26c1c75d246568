// Browser: the loop's navigation. The artist opens a returned version from the inbox, goes to its shot (activity in
// words), back, and starts "New version from this" (the editor on that version's scene); the supervisor opens compare
// from the resubmitted version — the default partner is the version sent back, not the draft saved in between —
// and plays both sides with Space in wipe and side by side.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { answerCors, openBrowser, screenshot, signInAs } from '../support/browser';
import { makeStudio, type TestStudio } from '../support/app';
import { bakedVersion } from '../support/bake';
import { tinyScene } from '../support/scenes';
import { makeShot } from '../server/endpoints';
import { closeDb } from '../../src/lib/server/db';

let studio: TestStudio;
let shotId: number;
afterAll(closeDb);
beforeAll(async () => {
  studio = await makeStudio();
  shotId = await makeShot(studio);
}, 60_000);

describe('the loop in Chromium', () => {
  it('inbox → returned version → shot → new version; compare opens on the returned version and plays', async () => {
    const artist = studio.members.artist.client;
    const supervisor = studio.members.supervisor.client;
    expect((await supervisor.patch(`/api/studios/${studio.id}/shots/${shotId}/workflow`, { assigneeId: studio.members.artist.id })).status).toBe(200);
    const v1 = await bakedVersion(artist, shotId, 1);
    expect((await artist.post(`/api/versions/${v1}/review/submit`, {})).status).toBe(200);
    expect((await supervisor.post(`/api/versions/${v1}/review/decide`, { decision: 'returned', comment: 'the crown rises too high' })).status).toBe(200);

    const ab = await openBrowser();
    const sb = await openBrowser();
    try {
      const a = ab.page;
      const s = sb.page;
      await answerCors(ab.context);
      await answerCors(sb.context);
      await signInAs(a, studio.members.artist.email, studio.members.artist.password);
      await a.waitForURL(/\/studios\//);
      await signInAs(s, studio.members.supervisor.email, studio.members.supervisor.password);
      await s.waitForURL(/\/studios\//);

      // The artist's inbox: the shot assigned to them and the version sent back, both new; it opens with what to change.
      await a.goto(`/studios/${studio.slug}/inbox`);
      await expect.poll(() => a.locator(`[data-testid="inbox-returned"] [data-version-id="${v1}"]`).getAttribute('data-unread'), { timeout: 15_000 }).toBe('true');
      expect(await a.getByTestId('inbox-assigned-shot').count()).toBe(1);
      await screenshot(a, 'loop-inbox-artist');
      await a.locator(`[data-testid="inbox-returned"] [data-version-id="${v1}"] a`).first().click();
      await a.waitForURL(new RegExp(`/versions/${v1}$`));
      await expect.poll(() => a.getByTestId('returned-banner').textContent(), { timeout: 15_000 }).toContain('the crown rises too high');
      await screenshot(a, 'loop-returned-version');

      // Version → shot: the activity says what happened in words.
      await a.getByTestId('version-shot-link').click();
      await a.waitForURL(new RegExp(`/shots/${shotId}$`));
      await expect.poll(() => a.getByTestId('activity').textContent(), { timeout: 15_000 }).toContain('sent v001 back for changes');
      const activity = (await a.getByTestId('activity').textContent()) ?? '';
      expect(activity).toContain('assigned the shot to');
      expect(activity).toContain('v001 baked');
      await screenshot(a, 'loop-shot-activity');

      // Back to v001 and "New version from this": the editor opens on v001's scene.
      await a.goto(`/studios/${studio.slug}/versions/${v1}`);
      await a.getByTestId('returned-banner').getByTestId('new-version-from-this').click();
      await a.waitForURL(new RegExp(`/shots/${shotId}/edit\\?from=${v1}$`));
      await a.waitForSelector('canvas', { timeout: 60_000 });
      await screenshot(a, 'loop-new-version-editor');

      // A draft saved in between, then v003 baked and submitted.
      expect((await artist.post(`/api/shots/${shotId}/versions`, { scene: tinyScene(12, 2), comment: 'a try' })).status).toBe(201);
      const v3 = await bakedVersion(artist, shotId, 3);
      expect((await artist.post(`/api/versions/${v3}/review/submit`, {})).status).toBe(200);

      // The supervisor compares from v003: the default partner is v001, the version sent back.
      await s.goto(`/studios/${studio.slug}/versions/${v3}`);
      await s.getByTestId('compare-link').click();
      await s.waitForURL(new RegExp(`/compare\\?a=${v1}&b=${v3}$`));
      await expect.poll(() => s.getByTestId('compare-frame-number').textContent(), { timeout: 30_000 }).toMatch(/^\d+$/);
      const start = Number(await s.getByTestId('compare-frame-number').textContent());
      await s.locator('body').press('Space');
      await expect.poll(async () => Number(await s.getByTestId('compare-frame-number').textContent()), { timeout: 10_000 }).toBeGreaterThan(start + 1);
      await s.locator('body').press('Space');
      const paused = Number(await s.getByTestId('compare-frame-number').textContent());
      await new Promise((r) => setTimeout(r, 500));
      expect(Number(await s.getByTestId('compare-frame-number').textContent())).toBe(paused);
      await screenshot(s, 'loop-compare-wipe');
      await s.getByTestId('compare-mode-side').click();
      await s.getByTestId('compare-play').click();
      await expect.poll(async () => Number(await s.getByTestId('compare-frame-number').textContent()), { timeout: 10_000 }).not.toBe(paused);
      await s.getByTestId('compare-play').click();
      await screenshot(s, 'loop-compare-side');
      expect(await s.getByTestId('change-words').count()).toBeGreaterThan(0);
    } finally {
      await ab.close();
      await sb.close();
    }
  }, 400_000);
});
