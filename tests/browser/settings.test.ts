// Browser: the studio owner sets the handle convention on the settings page; a supervisor sees it but cannot change it.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { openBrowser, screenshot, signInAs } from '../support/browser';
import { makeStudio, type TestStudio } from '../support/app';
import { closeDb, db } from '../../src/lib/server/db';
import { studios } from '../../src/lib/server/db/schema';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const convention = async () => (await db().select().from(studios).where(eq(studios.id, studio.id)))[0].handleConvention;

describe('studio settings page', () => {
  it('owner switches to "the first frame number is the cut in"; supervisor sees the choice disabled', async () => {
    for (const role of ['owner', 'supervisor'] as const) {
      const { page, close } = await openBrowser();
      try {
        const m = studio.members[role];
        await signInAs(page, m.email, m.password);
        await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
        await page.goto(`/studios/${studio.slug}/settings`);
        const cutIn = page.getByLabel('The first frame number is the cut in');
        if (role === 'owner') {
          expect(await page.getByLabel('The first frame number is the first head-handle frame').isChecked()).toBe(true);
          await cutIn.check();
          await page.getByText('Saved.').waitFor();
          expect(await convention()).toBe('cut-in');
          await screenshot(page, 'settings-handle-convention');
        } else {
          expect(await cutIn.isChecked()).toBe(true);
          expect(await cutIn.isDisabled()).toBe(true);
          await page.getByText('Only the studio owner can change this.').waitFor();
        }
      } finally {
        await close();
      }
    }
  }, 60_000);
});
