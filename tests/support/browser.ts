// Browser tests drive Debian's Chromium through playwright-core (never a downloaded browser).
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { mkdtempSync, mkdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { PNG } from 'pngjs';
import { APP } from './app';

export const SHOTS_DIR = path.resolve(__dirname, '../../test-results/screenshots');

const ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** Opens a fresh Chromium profile; close() removes it. */
/** Content-Security-Policy refusals Chromium reported in any page opened by these tests (also logged). */
export const cspViolations: string[] = [];

export async function openBrowser(): Promise<{ context: BrowserContext; page: Page; close: () => Promise<void> }> {
  const dir = mkdtempSync(path.join(tmpdir(), 'tidemark-chromium-'));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: '/usr/bin/chromium',
    args: ARGS,
    viewport: { width: 1280, height: 800 },
    baseURL: APP,
  });
  context.on('console', (msg) => {
    if (/Content Security Policy/i.test(msg.text())) {
      cspViolations.push(msg.text());
      console.error(`[csp] ${msg.text()}`);
    } else if (msg.type() === 'error') console.error(`[browser] ${msg.text()}${msg.location().url ? ` (${msg.location().url})` : ''}`);
  });
  context.on('weberror', (e) => console.error(`[browser] uncaught: ${e.error().message}`));
  // Each browser is its own visitor: its API calls carry their own client address (the test app trusts its loopback
  // proxy hop, as a studio's server trusts its proxy), so one test's wrong passwords never throttle another's sign-in.
  const ip = `10.8.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`;
  await context.route(`${APP}/api/**`, (route) => route.continue({ headers: { ...route.request().headers(), 'x-forwarded-for': ip } }));
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    close: async () => {
      await context.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

export async function screenshot(page: Page, name: string) {
  mkdirSync(SHOTS_DIR, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS_DIR, `${name}.png`), fullPage: true });
}

/** Waits until every island on the page has hydrated (Astro drops an island's `ssr` attribute then), so a click
 *  lands on a live control rather than on server-rendered markup that ignores it. Islands loaded `client:visible`
 *  stay unhydrated until scrolled into view: on such pages wait for the one island you need instead. */
export async function waitForIslands(page: Page, timeout = 60_000) {
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0, undefined, { timeout });
}

export async function signInAs(page: Page, email: string, password: string) {
  await page.goto('/sign-in');
  // Under CPU load the form's island can still be hydrating; a click before that submits nothing, and the
  // caller's wait for the next page times out. Astro drops the island's `ssr` attribute once it has hydrated.
  // (The caller waits for what follows: the next page, or the error of a wrong password.)
  await page.locator('astro-island:not([ssr]) input[name="email"]').waitFor({ timeout: 60_000 });
  await page.locator('input[name="email"]').fill(email);
  await page.locator('input[name="password"]').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/**
 * Collects the page's uncaught errors from now on, signs in as `who` and waits until the app has left the sign-in
 * page; returns the errors (tests end with `expect(errors).toEqual([])`).
 */
export async function signedIn(page: Page, who: { email: string; password: string }): Promise<string[]> {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await signInAs(page, who.email, who.password);
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
  return errors;
}

/** The test S3 stand-in's CORS rules name the dev origins, not this run's random app port: answer for it here. */
export async function answerCors(context: BrowserContext) {
  const appOrigin = new URL(APP).origin;
  await context.route(
    (url) => url.origin !== appOrigin,
    async (route) => {
      const cors = { 'access-control-allow-origin': appOrigin, 'access-control-expose-headers': 'Content-Range, Content-Length, ETag' };
      if (route.request().method() === 'OPTIONS') {
        return route.fulfill({ status: 204, headers: { ...cors, 'access-control-allow-methods': 'GET, HEAD', 'access-control-allow-headers': '*' } });
      }
      const response = await route.fetch();
      return route.fulfill({ response, headers: { ...response.headers(), ...cors } });
    },
  );
}

/** Opens a version page at a frame and waits until the player has drawn that frame, scrolled to the top. */
export async function openPlayerAt(page: Page, studioSlug: string, versionId: number, frame: number) {
  await page.goto(`/studios/${studioSlug}/versions/${versionId}?frame=${frame}`);
  await page.locator('[data-testid="player"][data-status="ready"]').waitFor({ timeout: 60_000 });
  await page.waitForFunction(
    (f) => document.querySelector('[data-testid="player"]')?.getAttribute('data-drawn-frame') === String(f),
    frame,
    { timeout: 30_000 },
  );
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.waitForTimeout(300);
}

/** Pixels of a PNG screenshot that pass a colour test. */
export function countPixels(png: Buffer, test: (r: number, g: number, b: number) => boolean): number {
  const img = PNG.sync.read(png);
  let n = 0;
  for (let p = 0; p < img.data.length; p += 4) if (test(img.data[p], img.data[p + 1], img.data[p + 2])) n++;
  return n;
}

/** Waits until the island holding `testId` has hydrated (Astro drops the island's `ssr` attribute then). */
export async function hydrated(page: Page, testId: string) {
  await page.locator(`astro-island:not([ssr]) [data-testid="${testId}"]`).waitFor({ timeout: 30_000 });
  return page.getByTestId(testId);
}
