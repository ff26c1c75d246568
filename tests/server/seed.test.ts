// The demo studio: seeding twice changes nothing the second time, and every printed sign-in works.
import { describe, it, expect, afterAll } from 'vitest';
import { and, inArray, sql, eq } from 'drizzle-orm';
import { db, closeDb } from '../../src/lib/server/db';
import { assets, memberships, shots, shows, studios, versions } from '../../src/lib/server/db/schema';
import { seedDemo, DEMO_USERS, DEMO_STUDIO } from '../../src/lib/server/seed';
import { headObject } from '../../src/lib/server/storage';
import { Client } from '../support/app';
import { getObject } from '../../src/lib/server/storage';
import { PNG } from 'pngjs';

afterAll(closeDb);

async function counts(studioId: number) {
  const n = async (t: typeof shows | typeof shots | typeof versions | typeof memberships) =>
    Number((await db().select({ n: sql<number>`count(*)` }).from(t).where(eq(t.studioId, studioId)))[0].n);
  // Plates, thumbnails and prop pictures only: a bake worker may store a clip asset between two seeds.
  const pictures = Number(
    (await db().select({ n: sql<number>`count(*)` }).from(assets).where(and(eq(assets.studioId, studioId), inArray(assets.kind, ['plate', 'thumbnail', 'picture']))))[0].n,
  );
  return { shows: await n(shows), shots: await n(shots), versions: await n(versions), members: await n(memberships), pictures };
}

describe('demo studio', () => {
  it('seeds idempotently, with plates in the store and frame ranges from 1001', async () => {
    const id = await seedDemo();
    const first = await counts(id);
    expect(first.members).toBe(4);
    expect(first.shows).toBe(2);
    expect(first.versions).toBeGreaterThan(0);
    expect(await seedDemo()).toBe(id);
    expect(await counts(id)).toEqual(first);
    const [studio] = await db().select().from(studios).where(eq(studios.id, id));
    expect(studio.slug).toBe(DEMO_STUDIO.slug);
    const rows = await db().select().from(shots).where(eq(shots.studioId, id));
    // Shot frame ranges start at 1001 (common practice, no source).
    expect(rows.every((s) => s.firstFrame === 1001 && s.lastFrame > 1001)).toBe(true);
    const withPlate = rows.filter((s) => s.plateAssetId);
    expect(withPlate.length).toBeGreaterThan(0);
    expect(withPlate.every((s) => s.metresPerPixel && s.metresPerPixel > 0)).toBe(true);
    // Every shot on a painted plate has that plate's thumbnail: a PNG 320 px wide, 16:9 like the 1920 × 1080 plate.
    expect(withPlate.every((s) => s.thumbnailAssetId)).toBe(true);
    const thumbs = await db().select().from(assets).where(eq(assets.studioId, id));
    for (const s of withPlate) {
      const t = thumbs.find((a) => a.id === s.thumbnailAssetId)!;
      expect([t.kind, t.contentType, t.width, t.height]).toEqual(['thumbnail', 'image/png', 320, 180]);
      expect((await headObject(t.storageKey))?.size).toBeGreaterThan(100);
    }
  });

  it('every printed demo sign-in works', async () => {
    await seedDemo();
    for (const u of DEMO_USERS) {
      const c = await new Client().signIn(u.email, u.password);
      const me = await c.get('/api/me');
      expect(me.body.studios).toEqual(expect.arrayContaining([expect.objectContaining({ slug: DEMO_STUDIO.slug, role: u.role })]));
    }
  });

  it('demo plates are stored objects', async () => {
    await seedDemo();
    const keys = await db().execute(sql`SELECT storage_key FROM assets WHERE kind = 'plate' AND storage_key LIKE '%demo-%'`);
    const list = (keys[0] as unknown as { storage_key: string }[]).map((r) => r.storage_key);
    expect(list.length).toBeGreaterThan(0);
    for (const k of list) expect((await headObject(k))?.size).toBeGreaterThan(10_000);
  });
});

describe('demo plates through the API', () => {
  it('the plate of a demo shot can be viewed (it is a finished upload)', async () => {
    const id = await seedDemo();
    const [shot] = (await db().select().from(shots).where(eq(shots.studioId, id))).filter((s) => s.plateAssetId);
    const owner = DEMO_USERS.find((u) => u.role === 'owner')!;
    const c = await new Client().signIn(owner.email, owner.password);
    const res = await c.get(`/api/studios/${id}/plates/${shot.plateAssetId}`);
    expect(res.status).toBe(200);
    expect(res.body.asset.width).toBe(1920);
    const png = await fetch(res.body.url);
    expect(png.headers.get('content-type')).toBe('image/png');
  });

  it('demo shots list a thumbnail URL that serves a PNG', async () => {
    const id = await seedDemo();
    const owner = DEMO_USERS.find((u) => u.role === 'owner')!;
    const c = await new Client().signIn(owner.email, owner.password);
    const res = await c.get(`/api/studios/${id}/shots?pageSize=100`);
    expect(res.status).toBe(200);
    const withThumb = res.body.items.filter((s: { thumbnailUrl: string | null }) => s.thumbnailUrl);
    expect(withThumb.length).toBeGreaterThan(0);
    const png = await fetch(withThumb[0].thumbnailUrl);
    expect(png.status).toBe(200);
    expect(Buffer.from(await png.arrayBuffer()).subarray(1, 4).toString('ascii')).toBe('PNG');
  });
});

describe('the demo can', () => {
  it('is drawn as the studio\'s prop picture in the soda shots: a ready RGBA PNG, transparent round the can', async () => {
    const id = await seedDemo();
    const [hero] = await db().select().from(shots).where(and(eq(shots.studioId, id), eq(shots.code, 'CNB_020')));
    const [version] = await db().select().from(versions).where(eq(versions.shotId, hero.id));
    const can = (version.scene as { props: { id: string; picture?: number; colour?: string }[] }).props.find((p) => p.id === 'can')!;
    expect(can.picture).toBeGreaterThan(0);
    expect(can.colour).toBe('#D23C32'); // its rim
    const [picture] = await db().select().from(assets).where(eq(assets.id, can.picture!));
    expect([picture.studioId, picture.kind, picture.contentType, (picture.meta as { state: string }).state]).toEqual([id, 'picture', 'image/png', 'ready']);
    // Read back with pngjs (an independent decoder): 132 × 244, the can's 66 × 122 mm proportions (seed.ts).
    const img = PNG.sync.read(Buffer.from(await getObject(picture.storageKey)));
    expect([img.width, img.height]).toEqual([picture.width, picture.height]);
    expect(img.width / img.height).toBeCloseTo(66 / 122, 2);
    const alpha = (x: number, y: number) => img.data[(y * img.width + x) * 4 + 3];
    expect(alpha(0, 0)).toBe(0); // a cut corner (the can's rounded shoulder)
    expect(alpha(img.width >> 1, img.height >> 1)).toBe(255);
  });
});
