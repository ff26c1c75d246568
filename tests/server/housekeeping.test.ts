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
