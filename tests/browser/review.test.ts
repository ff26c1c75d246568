// Browser: the review loop in two Chromium profiles. An artist submits a baked version; a supervisor pins two notes to
// frames and sends it back; the artist finds the notes in the inbox and the e-mail in the catcher, saves and bakes a
// new version, sees the notes carried over and submits it; the supervisor compares the two with the wipe and approves.
// Needs the version page to mount src/components/review/ReviewPanel beside the player (currentFrame / onSeek wired).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Page } from 'playwright-core';
import { answerCors, openBrowser, screenshot, signInAs } from '../support/browser';
import { APP, makeStudio, waitForMail, type TestStudio } from '../support/app';
import { bakedVersion as bakedVersionOf } from '../support/bake';
import { makeShot } from '../server/endpoints';
import { closeDb } from '../../src/lib/server/db';

let studio: TestStudio;
let shotId: number;
afterAll(closeDb);

const bakedVersion = (seed: number) => bakedVersionOf(studio.members.artist.client, shotId, seed);

beforeAll(async () => {
  studio = await makeStudio();
  shotId = await makeShot(studio);
}, 60_000);

const panelState = (page: Page) => page.getByTestId('review-panel-state');

/** Steps the player to a frame with its "Next frame" button (enabled once the bake is open); the composer follows. */
async function goToFrame(page: Page, from: number, to: number) {
  const next = page.getByRole('button', { name: 'Next frame (→)' });
  for (let f = from; f < to; f++) {
    await next.click();
    await expect.poll(() => page.getByTestId('frame-readout').textContent(), { timeout: 10_000 }).toBe(String(f + 1));
  }
  await expect.poll(() => page.getByTestId('composer-frame').textContent(), { timeout: 10_000 }).toBe(String(to));
}

describe('review in Chromium', () => {
  it('submit → two frame notes and a return → inbox and e-mail → new version → wipe compare → approve', async () => {
    const v1 = await bakedVersion(1);
    const artistBrowser = await openBrowser();
    const supervisorBrowser = await openBrowser();
    try {
      const a = artistBrowser.page;
      const s = supervisorBrowser.page;
      await answerCors(artistBrowser.context);
      await answerCors(supervisorBrowser.context);
      await signInAs(a, studio.members.artist.email, studio.members.artist.password);
      await a.waitForURL(/\/studios\//);
      await signInAs(s, studio.members.supervisor.email, studio.members.supervisor.password);
      await s.waitForURL(/\/studios\//);

      // The artist submits v1.
      await a.goto(`/studios/${studio.slug}/versions/${v1}`);
      await expect.poll(() => panelState(a).getAttribute('data-state'), { timeout: 15_000 }).toBe('draft');
      await a.getByLabel('A word for the reviewers (optional)').fill('first pass at the splash');
      await a.getByRole('button', { name: 'Submit for review' }).click();
      await expect.poll(() => panelState(a).getAttribute('data-state'), { timeout: 10_000 }).toBe('submitted');
      await waitForMail(studio.members.supervisor.email, (m) => m.text.includes(`/versions/${v1}`));
      await a.goto('about:blank'); // away from the notes, so the new ones stay unread until the inbox shows them

      // The supervisor pins two notes to frames and sends the version back.
      await s.goto(`/studios/${studio.slug}/inbox`);
      await expect.poll(() => s.getByTestId('inbox-version').count()).toBe(1);
      await s.getByTestId('inbox-version').getByRole('link').first().click();
      await s.waitForURL(new RegExp(`/versions/${v1}`));
      await expect.poll(() => panelState(s).getAttribute('data-state'), { timeout: 15_000 }).toBe('submitted');
      await goToFrame(s, 1001, 1003);
      await s.getByPlaceholder('What do you see on this frame?').fill('the crown breaks too early here');
      await s.getByRole('button', { name: 'Add note' }).click();
      await expect.poll(() => s.getByTestId('note-thread').count()).toBe(1);
      await goToFrame(s, 1003, 1007);
      await s.getByPlaceholder('What do you see on this frame?').fill('too much spray on the right');
      await s.getByRole('button', { name: 'Add note' }).click();
      await expect.poll(() => s.getByTestId('note-thread').count()).toBe(2);
      await s.getByLabel('Comment (needed to send it back)').fill('two frames to fix, see notes');
      await s.getByRole('button', { name: 'Send back for changes' }).click();
      await expect.poll(() => panelState(s).getAttribute('data-state'), { timeout: 10_000 }).toBe('returned');
      await screenshot(s, 'review-returned-with-notes');

      // The artist sees the notes in the inbox (with the count in the navigation) and the e-mail in the catcher.
      await a.goto(`/studios/${studio.slug}/inbox`);
      expect((await a.getByTestId('nav-inbox-count').textContent())?.trim()).toBe('3');
      await expect.poll(() => a.getByTestId('inbox-note').count()).toBe(2);
      expect(await a.getByTestId('inbox-returned').textContent()).toContain('two frames to fix, see notes');
      await screenshot(a, 'review-artist-inbox');
      const mail = await waitForMail(studio.members.artist.email, (m) => m.subject.startsWith('Back for changes'));
      expect(mail.text).toContain(`${APP}/studios/${studio.slug}/versions/${v1}?frame=1003`);
      expect(mail.text).toContain(`${APP}/studios/${studio.slug}/versions/${v1}?frame=1007`);

      // A new version: the open notes of v1 come along; the artist submits it.
      const v2 = await bakedVersion(2);
      await a.goto(`/studios/${studio.slug}/versions/${v2}`);
      await expect.poll(() => a.getByTestId('carried-note').count(), { timeout: 15_000 }).toBe(2);
      await a.getByRole('button', { name: 'Submit for review' }).click();
      await expect.poll(() => panelState(a).getAttribute('data-state'), { timeout: 10_000 }).toBe('submitted');

      // The supervisor compares v1 and v2 with the wipe, locked to one frame, then approves v2.
      await s.goto(`/studios/${studio.slug}/compare?a=${v1}&b=${v2}&frame=1005`);
      await s.getByTestId('compare-mode-wipe').click();
      await expect.poll(() => s.getByTestId('compare-frame-number').textContent(), { timeout: 20_000 }).toBe('1005');
      // Each side draws with its own player engine (a WebGL layer, plus a 2D layer for dots and spray).
      expect(await s.locator('[data-testid="compare-a"] canvas').count()).toBeGreaterThanOrEqual(1);
      expect(await s.locator('[data-testid="compare-b"] canvas').count()).toBeGreaterThanOrEqual(1);
      await s.getByTestId('compare-wipe').fill('0.3');
      await s.locator('body').press('ArrowRight');
      await expect.poll(() => s.getByTestId('compare-frame-number').textContent()).toBe('1006');
      expect(await s.getByTestId('change-row').count()).toBe(1); // only the seed differs between the two passes
      expect(await s.getByTestId('change-row').first().getAttribute('data-path')).toBe('physics.seed');
      await screenshot(s, 'review-compare-wipe');

      await s.goto(`/studios/${studio.slug}/versions/${v2}`);
      await expect.poll(() => panelState(s).getAttribute('data-state'), { timeout: 15_000 }).toBe('submitted');
      await s.getByRole('button', { name: 'Approve' }).click();
      await expect.poll(() => panelState(s).getAttribute('data-state'), { timeout: 10_000 }).toBe('approved');
      await waitForMail(studio.members.artist.email, (m) => m.subject.startsWith('Approved'));
    } finally {
      await artistBrowser.close();
      await supervisorBrowser.close();
    }
  }, 180_000);
});
