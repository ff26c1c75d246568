// Browser: buttons that cannot double-fire and the client's home. A supervisor double-clicks Approve on the version
// page: one decision (one review event), a success message and no red error. The supervisor e-mails a share link to
// the client's address; the client signs in and finds the version waiting on their home; a guest signs off on the
// share page with an address and receives the confirmation.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { answerCors, openBrowser, screenshot, signInAs, hydrated } from '../support/browser';
import { makeStudio, waitForMail, type TestStudio } from '../support/app';
import { bakedVersion } from '../support/bake';
import { makeShot } from '../server/endpoints';
import { closeDb, db } from '../../src/lib/server/db';
import { reviewEvents } from '../../src/lib/server/db/schema';

let studio: TestStudio;
let shotId: number;
afterAll(closeDb);

beforeAll(async () => {
  studio = await makeStudio();
  shotId = await makeShot(studio);
}, 60_000);

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);

describe('clients in the loop, in Chromium', () => {
  it('double-click Approve makes one decision without an error; a link e-mailed to the client waits on their home; a guest sign-off is confirmed by e-mail', async () => {
    const versionId = await bakedVersion(studio.members.artist.client, shotId, 5);
    expect((await studio.members.artist.client.post(`/api/versions/${versionId}/review/submit`, {})).status).toBe(200);
    const sup = await openBrowser();
    const client = await openBrowser();
    const guest = await openBrowser();
    try {
      for (const b of [sup, client, guest]) await answerCors(b.context);
      const s = sup.page;
      const errors: string[] = [];
      s.on('pageerror', (e) => errors.push(e.message));
      await signInAs(s, studio.members.supervisor.email, studio.members.supervisor.password);
      await s.waitForURL(/\/studios\//);
      await s.goto(`/studios/${studio.slug}/versions/${versionId}`);
      const status = await hydrated(s, 'review-status');
      let decideCalls = 0;
      s.on('request', (r) => r.url().endsWith(`/api/versions/${versionId}/review/decide`) && decideCalls++);
      await status.getByRole('button', { name: 'Approve' }).dblclick();
      await expect.poll(() => s.getByTestId('review-panel-state').getAttribute('data-state'), { timeout: 15_000 }).toBe('approved');
      await status.getByRole('status').filter({ hasText: 'Approved.' }).waitFor({ timeout: 10_000 });
      await s.waitForTimeout(800);
      expect(await status.getByRole('alert').count()).toBe(0); // no red error after the success
      expect(decideCalls).toBe(1);
      const events = (await db().select().from(reviewEvents).where(eq(reviewEvents.versionId, versionId))).filter((e) => e.toState === 'approved');
      expect(events).toHaveLength(1);
      await screenshot(s, 'clients-loop-approved-once');

      // The supervisor asks for the sign-off and e-mails a share link to the client's own address.
      expect((await studio.members.supervisor.client.post(`/api/versions/${versionId}/client-review`, {})).status).toBe(200);
      const link = await studio.members.supervisor.client.post(`/api/versions/${versionId}/share-links`, { expiresAt: inDays(7), email: studio.members.client.email });
      expect(link.status, JSON.stringify(link.body)).toBe(201);

      // The client signs in: their home lists it under "To sign off".
      const c = client.page;
      await signInAs(c, studio.members.client.email, studio.members.client.password);
      await c.waitForURL(/\/studios\//);
      await c.goto(`/studios/${studio.slug}`);
      const waiting = c.getByTestId('client-waiting-sign-off');
      await waiting.waitFor();
      expect(await waiting.textContent()).toContain('v001');
      expect(await c.getByText('Nothing shared with you yet').count()).toBe(0);
      await screenshot(c, 'clients-loop-client-home');
      await waiting.getByRole('link').first().click();
      await c.waitForURL(new RegExp(`/versions/${versionId}`));

      // A guest signs off on the share page and gives an address: the confirmation arrives.
      const g = guest.page;
      await g.goto(link.body.url);
      const card = await hydrated(g, 'share-sign-off');
      await card.getByTestId('client-decision-name').fill('Ines Varga');
      await card.getByTestId('client-decision-email').fill('ines@agency.test');
      await card.getByTestId('client-sign-off').dblclick();
      await g.getByTestId('share-sign-off-done').waitFor({ timeout: 15_000 });
      expect(await g.getByTestId('share-sign-off-done').textContent()).toContain('A confirmation is on its way to ines@agency.test');
      await screenshot(g, 'clients-loop-guest-signed-off');
      const mail = await waitForMail('ines@agency.test', (m) => m.subject.startsWith('You signed off'));
      expect(mail.text).toContain('This confirms that you signed off v001');
      expect(errors).toEqual([]);
    } finally {
      await guest.close();
      await client.close();
      await sup.close();
    }
  }, 300_000);
});
