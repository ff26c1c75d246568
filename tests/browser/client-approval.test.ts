// Browser: the client's sign-off in Chromium. A supervisor approves a baked version and asks the client to sign it
// off from the version page; a guest opens the share link without an account and signs off under their name; the
// studio's version page and shot page then show both states. A signed-in client asks for changes on another version
// from their own view of it.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { answerCors, openBrowser, screenshot, signInAs, hydrated } from '../support/browser';
import { makeStudio, waitForMail, type TestStudio } from '../support/app';
import { bakedVersion } from '../support/bake';
import { makeShot } from '../server/endpoints';
import { closeDb, db } from '../../src/lib/server/db';
import { versions } from '../../src/lib/server/db/schema';

let studio: TestStudio;
let shotId: number;
afterAll(closeDb);

beforeAll(async () => {
  studio = await makeStudio();
  shotId = await makeShot(studio);
}, 60_000);

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);

/** A baked version the studio approved, shown to clients. */
async function approved(seed: number) {
  const id = await bakedVersion(studio.members.artist.client, shotId, seed);
  expect((await studio.members.artist.client.post(`/api/versions/${id}/review/submit`, {})).status).toBe(200);
  expect((await studio.members.supervisor.client.post(`/api/versions/${id}/review/decide`, { decision: 'approved' })).status).toBe(200);
  return id;
}

describe('client sign-off in Chromium', () => {
  it('supervisor asks → guest signs off on the share page → both states on the version and shot pages; a signed-in client asks for changes', async () => {
    const versionId = await approved(3);
    const sup = await openBrowser();
    const guest = await openBrowser();
    const client = await openBrowser();
    try {
      for (const b of [sup, guest, client]) await answerCors(b.context);
      const s = sup.page;
      await signInAs(s, studio.members.supervisor.email, studio.members.supervisor.password);
      await s.waitForURL(/\/studios\//);

      // The supervisor asks the client to sign off from the version page.
      await s.goto(`/studios/${studio.slug}/versions/${versionId}`);
      const card = await hydrated(s, 'client-sign-off-card');
      expect(await card.getByTestId('review-panel-client-state').getAttribute('data-state')).toBe('not sent');
      await s.getByLabel('A word for the client (optional)').fill('The crown now stays below the rim.');
      await s.getByTestId('ask-client').click();
      await expect.poll(() => card.getByTestId('review-panel-client-state').getAttribute('data-state'), { timeout: 10_000 }).toBe('waiting');
      expect(await s.getByTestId('header-client-state').textContent()).toBe('Waiting for client');
      await waitForMail(studio.members.client.email, (m) => m.subject.startsWith('Your sign-off, please') && m.text.includes('below the rim'));

      // A link for the client's people without accounts.
      const link = await studio.members.supervisor.client.post(`/api/versions/${versionId}/share-links`, { expiresAt: inDays(7) });
      expect(link.status, JSON.stringify(link.body)).toBe(201);

      // The guest signs off on the share page.
      const g = guest.page;
      await g.goto(new URL(link.body.url).pathname);
      const signOff = await hydrated(g, 'share-sign-off');
      expect(await signOff.getByTestId('share-client-state').textContent()).toBe('Waiting for client');
      await screenshot(g, 'client-sign-off-share-page-waiting');
      // a decision without a name is refused, naming the field, and nothing is stored
      await signOff.getByTestId('client-sign-off').click();
      await signOff.getByText('Name is required').waitFor();
      expect(await signOff.getByRole('alert').count()).toBe(0); // the field's message only, not twice
      expect((await db().select().from(versions).where(eq(versions.id, versionId)))[0].clientState).toBe('waiting');
      await signOff.getByTestId('client-decision-name').fill('Ines Varga');
      await signOff.getByTestId('client-sign-off').click();
      await signOff.getByTestId('share-sign-off-done').waitFor();
      await expect.poll(() => signOff.getByTestId('share-client-state').getAttribute('data-state')).toBe('signed off');
      expect(await signOff.getByTestId('client-decision').textContent()).toContain('Signed off by Ines Varga');
      await g.getByTestId('shared-canvas').waitFor({ timeout: 30_000 }).catch(() => undefined); // the player, for the picture
      await screenshot(g, 'client-signed-off-share-page');
      await waitForMail(studio.members.supervisor.email, (m) => m.subject.startsWith('Client signed off') && m.text.includes('Ines Varga'));

      // The studio sees both states: on the version page and on the shot page.
      await s.reload();
      await hydrated(s, 'client-sign-off-card');
      await expect.poll(() => s.getByTestId('review-panel-client-state').getAttribute('data-state'), { timeout: 10_000 }).toBe('signed off');
      expect(await s.getByTestId('review-state').textContent()).toBe('Approved by us');
      expect(await s.getByTestId('header-client-state').textContent()).toBe('Client signed off');
      expect(await s.getByTestId('ask-client').count()).toBe(0); // a signed-off decision is not asked for again
      await s.getByTestId('player-loading').waitFor({ state: 'detached', timeout: 30_000 }).catch(() => undefined);
      await screenshot(s, 'client-signed-off-version-page');
      await s.goto(`/studios/${studio.slug}/shots/${shotId}`);
      const row = s.getByTestId('versions').locator('li').first();
      await row.getByTestId('version-client-state').waitFor();
      expect(await row.textContent()).toContain('Approved by us');
      expect(await row.getByTestId('version-client-state').textContent()).toBe('Client signed off');
      await s.goto(`/studios/${studio.slug}/inbox`);
      await s.getByTestId('inbox-client-version').filter({ hasText: 'Client signed off' }).waitFor();
      await screenshot(s, 'client-signed-off-inbox');

      // A newer version, approved and asked for; the signed-in client asks for changes from their own view.
      const v2 = await approved(4);
      expect((await studio.members.supervisor.client.post(`/api/versions/${v2}/client-review`, {})).status).toBe(200);
      const c = client.page;
      await signInAs(c, studio.members.client.email, studio.members.client.password);
      await c.waitForURL(/\/studios\//);
      await c.goto(`/studios/${studio.slug}/inbox`);
      await c.getByTestId('inbox-client').getByRole('link').first().click();
      await c.waitForURL(new RegExp(`/versions/${v2}`));
      const own = await hydrated(c, 'client-sign-off-card');
      await own.getByTestId('client-decision-comment').fill('Less spray on the left, please.');
      await own.getByTestId('client-ask-changes').click();
      await expect.poll(() => own.getByTestId('review-panel-client-state').getAttribute('data-state'), { timeout: 10_000 }).toBe('changes asked');
      expect(await own.getByTestId('client-decision').textContent()).toContain('Less spray on the left');
      await screenshot(c, 'client-asked-changes-own-view');
      await waitForMail(studio.members.owner.email, (m) => m.subject.startsWith('Client asked for changes') && m.text.includes('Less spray on the left'));
    } finally {
      await sup.close();
      await guest.close();
      await client.close();
    }
  }, 240_000);
});
