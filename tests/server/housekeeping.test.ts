// Housekeeping: old throttle hits, sign-in attempts and finished bake jobs are purged; recent rows, running jobs and
// the newest job of each version stay.
import { describe, it, expect, afterAll } from 'vitest';
import { eq, inArray } from 'drizzle-orm';
import { makeStudio } from '../support/app';
import { makeVersion } from './endpoints';
import { db, closeDb } from '../../src/lib/server/db';
import { bakeJobs, throttleHits } from '../../src/lib/server/db/schema';
import { purgeOld, RETENTION } from '../../src/lib/server/housekeeping';

afterAll(closeDb);

describe('purge', () => {
  it('deletes what is past retention and keeps the rest', async () => {
    const studio = await makeStudio();
    const { versionId } = await makeVersion(studio, { baked: true });
    const old = new Date(Date.now() - (RETENTION.finishedJobsDays + 5) * 86_400_000);
    const job = (state: 'done' | 'failed' | 'running', at: Date) => ({ studioId: studio.id, versionId, sceneHash: 'h', state, updatedAt: at, finishedAt: at });
    const ids: number[] = [];
    for (const j of [job('done', old), job('failed', old), job('running', old), job('done', old)]) {
      const [r] = await db().insert(bakeJobs).values(j);
      ids.push(Number(r.insertId));
    }
    const [h1] = await db().insert(throttleHits).values({ bucket: 'test', keyHash: 'a'.repeat(64), createdAt: new Date(Date.now() - 3 * 86_400_000) });
    const [h2] = await db().insert(throttleHits).values({ bucket: 'test', keyHash: 'a'.repeat(64) });
    const res = await purgeOld();
    expect(res.bakeJobs).toBeGreaterThanOrEqual(2);
    const left = (await db().select({ id: bakeJobs.id }).from(bakeJobs).where(inArray(bakeJobs.id, ids))).map((r) => r.id).sort((a, b) => a - b);
    // the old done and failed jobs go; the running one and the version's newest job stay
    expect(left).toEqual([ids[2], ids[3]]);
    expect(await db().select().from(throttleHits).where(eq(throttleHits.id, Number(h1.insertId)))).toHaveLength(0);
    expect(await db().select().from(throttleHits).where(eq(throttleHits.id, Number(h2.insertId)))).toHaveLength(1);
  });
});

describe('pending uploads', () => {
  it('an upload never completed expires: its row and its object are deleted; fresh pending and completed ones stay', async () => {
    const { makeShot, makePng } = await import('./endpoints');
    const { postUploadForm, uploadPngPlate } = await import('../support/plates');
    const { assets } = await import('../../src/lib/server/db/schema');
    const { headObject } = await import('../../src/lib/server/storage');
    const studio = await makeStudio();
    const shotId = await makeShot(studio);
    const artist = studio.members.artist.client;
    const png = makePng(8, 8);
    const start = () => artist.post(`/api/studios/${studio.id}/shots/${shotId}/plates`, { fileName: 'p.png', contentType: 'image/png', byteSize: png.length });
    const stale = await start();
    expect((await postUploadForm(stale.body.upload, png, 'image/png')).status).toBeLessThan(300);
    const fresh = await start();
    const ready = await uploadPngPlate(studio, shotId, png);
    const old = new Date(Date.now() - (RETENTION.pendingUploadsHours + 1) * 3600_000);
    await db().update(assets).set({ createdAt: old }).where(inArray(assets.id, [stale.body.assetId, ready]));
    expect(await headObject(stale.body.upload.fields.key)).not.toBeNull();
    const res = await purgeOld();
    expect(res.pendingUploads).toBeGreaterThanOrEqual(1);
    const left = (await db().select({ id: assets.id }).from(assets).where(inArray(assets.id, [stale.body.assetId, fresh.body.assetId, ready]))).map((r) => r.id);
    expect(left.sort((a, b) => a - b)).toEqual([fresh.body.assetId, ready].sort((a, b) => a - b));
    expect(await headObject(stale.body.upload.fields.key)).toBeNull();
    // The expired upload can no longer be completed.
    expect((await artist.post(`/api/studios/${studio.id}/plates/${stale.body.assetId}/complete`, {})).status).toBe(404);
  });

  it('an export never completed expires the same way', async () => {
    const { makeVersion: version } = await import('./endpoints');
    const { postUploadForm } = await import('../support/plates');
    const { assets } = await import('../../src/lib/server/db/schema');
    const { headObject } = await import('../../src/lib/server/storage');
    const studio = await makeStudio();
    const { versionId } = await version(studio, { baked: true });
    const gif = new Uint8Array([0x47, 0x49, 0x46, 0x38, 0x39, 0x61, 2, 0, 2, 0, 0, 0, 0, 0x2c, 0, 0x3b]);
    const options = { first: 1001, last: 1010, width: 320, height: 180, look: 'surface', slate: true, burnIns: true, plate: false };
    const start = await studio.members.artist.client.post(`/api/versions/${versionId}/exports`, { format: 'gif', byteSize: gif.length, fileName: 'X_v001.gif', options });
    expect(start.status, JSON.stringify(start.body)).toBe(201);
    expect((await postUploadForm(start.body.upload, gif, 'image/gif')).status).toBe(204);
    await db().update(assets).set({ createdAt: new Date(Date.now() - (RETENTION.pendingUploadsHours + 1) * 3600_000) }).where(eq(assets.id, start.body.assetId));
    expect((await purgeOld()).pendingUploads).toBeGreaterThanOrEqual(1);
    expect(await db().select().from(assets).where(eq(assets.id, start.body.assetId))).toHaveLength(0);
    expect(await headObject(start.body.upload.fields.key)).toBeNull();
  });
});
