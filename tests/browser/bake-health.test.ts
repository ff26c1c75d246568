// Browser: the version page says nothing about a healthy bake (nor about one stored before health verdicts), and
// shows an unhealthy bake's findings in plain words above the player. The unhealthy verdict is written into the
// clip's meta here (a real blow-up takes minutes to bake); it is the verdict of the stored frames with their count
// dropped to nothing, so its words are the ones a bake that lost its liquid would store.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { openBrowser, screenshot, signInAs } from '../support/browser';
import { makeStudio, type TestStudio } from '../support/app';
import { tinyScene } from '../support/scenes';
import { makeShot } from '../server/endpoints';
import { closeDb, db } from '../../src/lib/server/db';
import { assets, versions } from '../../src/lib/server/db/schema';
import { parseScene } from '../../src/lib/scene';
import { bakeHealth } from '../../src/lib/sim/health';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
}, 60_000);
afterAll(closeDb);

describe('bake health on the version page', () => {
  it('shows nothing for a healthy or older bake, and the findings of an unhealthy one', async () => {
    const artist = studio.members.artist.client;
    const shotId = await makeShot(studio);
    const doc = tinyScene(12, 3);
    const saved = await artist.post(`/api/shots/${shotId}/versions`, { scene: doc, comment: 'health check' });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    const versionId = saved.body.version.id;
    expect((await artist.post(`/api/versions/${versionId}/bake`)).status).toBe(202);
    for (let i = 0; i < 600; i++) {
      const res = await artist.get(`/api/versions/${versionId}/bake`);
      if (res.body.bakeState === 'baked') break;
      if (res.body.bakeState === 'failed') throw new Error(`bake failed: ${res.body.bake?.error}`);
      await new Promise((r) => setTimeout(r, 200));
    }
    const clip = await artist.get(`/api/versions/${versionId}/clip`);
    expect(clip.status).toBe(200);
    expect(clip.body.health.healthy).toBe(true);
    const stats = await (await fetch(clip.body.statsUrl)).json();

    const [row] = await db().select({ assetId: versions.clipAssetId }).from(versions).where(eq(versions.id, versionId));
    const [asset] = await db().select({ meta: assets.meta }).from(assets).where(eq(assets.id, row.assetId!));
    const meta = asset.meta as Record<string, unknown>;
    const setMeta = (m: Record<string, unknown>) => db().update(assets).set({ meta: m }).where(eq(assets.id, row.assetId!));

    const parsed = parseScene(doc);
    if (!parsed.ok) throw new Error('tiny scene is invalid');
    const lost = bakeHealth(parsed.scene, stats.frames.map((f: { count: number }, i: number) => (i > 0 ? { ...f, count: 0 } : f)));
    expect(lost.healthy).toBe(false);

    const b = await openBrowser();
    try {
      const { page } = b;
      await signInAs(page, studio.members.artist.email, studio.members.artist.password);
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      const url = `/studios/${studio.slug}/versions/${versionId}`;

      await page.goto(url);
      await page.getByTestId('player').waitFor({ timeout: 30_000 });
      expect(await page.getByTestId('bake-health').count()).toBe(0);

      // a bake stored before verdicts existed: no health in its meta, nothing shown
      const { health: _, ...older } = meta;
      await setMeta(older);
      await page.reload();
      await page.getByTestId('player').waitFor({ timeout: 30_000 });
      expect(await page.getByTestId('bake-health').count()).toBe(0);

      await setMeta({ ...meta, health: lost });
      await page.reload();
      const note = page.getByTestId('bake-health');
      await note.waitFor({ timeout: 30_000 });
      expect(await note.textContent()).toContain('Liquid lost: 100 % of the particles left the tank');
      await screenshot(page, 'bake-health-unhealthy');

      // the gate: without a reason the server refuses, naming the field; the panel then asks for one
      const refused = await artist.post(`/api/versions/${versionId}/review/submit`, {});
      expect(refused.status).toBe(400);
      expect(refused.body.error.fields.overrideReason).toBeTruthy();
      await page.getByRole('button', { name: 'Submit for review' }).click();
      const reason = page.getByTestId('override-reason');
      await reason.waitFor({ timeout: 15_000 });
      await reason.fill('The loss is the spray leaving the frame; judge the splash');
      await screenshot(page, 'bake-health-override');
      await page.getByRole('button', { name: 'Submit anyway' }).click();
      await page.getByTestId('review-panel-state').and(page.locator('[data-state="submitted"]')).waitFor({ timeout: 15_000 });
      const review = await artist.get(`/api/versions/${versionId}/review`);
      const last = review.body.events[review.body.events.length - 1];
      expect(last.toState).toBe('submitted');
      expect(last.comment).toContain('Submitted although the bake went wrong: The loss is the spray leaving the frame');
    } finally {
      await b.close();
    }
  }, 240_000);
});
