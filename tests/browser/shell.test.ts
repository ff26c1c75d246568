// Browser: sign in, see the library shell, sign out.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { openBrowser, screenshot, signInAs } from '../support/browser';
import { makeStudio, type TestStudio } from '../support/app';
import { closeDb } from '../../src/lib/server/db';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

describe('app shell in Chromium', () => {
  it('signs in, shows the library, signs out', async () => {
    const b = await openBrowser();
    try {
      const { page } = b;
      await page.goto(`/studios/${studio.slug}/`);
      await page.waitForURL(/\/sign-in/);
      await signInAs(page, studio.members.supervisor.email, studio.members.supervisor.password);
      await page.waitForURL(new RegExp(`/studios/${studio.slug}/`));
      const library = page.getByTestId('library');
      await library.waitFor();
      expect(await library.textContent()).toContain(`Studio ${studio.slug}`);
      await screenshot(page, 'shell-library');
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL(/\/sign-in/);
      await page.goto(`/studios/${studio.slug}/`);
      await page.waitForURL(/\/sign-in/);
    } finally {
      await b.close();
    }
  });

  it('shows a wrong password next to the field', async () => {
    const b = await openBrowser();
    try {
      await signInAs(b.page, studio.members.artist.email, 'definitely-wrong');
      await b.page.getByText('Wrong e-mail or password').first().waitFor();
      expect(b.page.url()).toContain('/sign-in');
    } finally {
      await b.close();
    }
  });
});
