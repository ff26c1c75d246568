// How many queries the library's hot endpoints send, counted by the app's drizzle logger (the app answers with
// X-Query-Count under npm test; src/middleware.ts). The counts must not grow with the number of rows on the page:
// that is what keeps the shots list from going back to one query (or one presigning) per row.
//
// Expected counts (one signed-in request whose session was already seen active, so no "last active" write):
//   GET /api/studios/:id/shots?showId=…   studio member 2: the session with user and memberships (one join), the page
//                                         (rows, window total and thumbnail keys in one query)
//                                         client 2: the same, the client rule being a subquery of the page's query
//   GET /api/versions/:id                 studio member 2: the session join, the version with its shot
//                                         client 3: the session join, the version with its shot, the version under
//                                         the client rule
//   GET /api/me                           1: the session join (the studios come with it)
//   an empty first page of a show         3: the session join, the page, the show (to tell empty from missing)
//   a page of a show past its end         4: those three and a count for the total
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq, inArray } from 'drizzle-orm';
import { grantClientShow, makeStudio, unique, type TestStudio } from '../support/app';
import { tinyScene } from '../support/scenes';
import { db, closeDb } from '../../src/lib/server/db';
import { assets, shots, versions } from '../../src/lib/server/db/schema';

let studio: TestStudio;
let showId: number;
let emptyShowId: number;
const shotIds: number[] = [];
const versionIds: number[] = [];
const api = () => `/api/studios/${studio.id}`;
const supervisor = () => studio.members.supervisor.client;
const client = () => studio.members.client.client;

async function counted(who: () => TestStudio['members']['owner']['client'], path: string) {
  const res = await who().get(path);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  const n = res.headers.get('x-query-count');
  expect(n, 'the app under npm test says how many queries it sent').not.toBeNull();
  return { body: res.body, queries: Number(n) };
}

/** Adds a shot with a thumbnail asset and one version shared with clients. */
async function addShot() {
  const shot = await supervisor().post(`${api()}/shots`, { showId, code: unique('Q'), lastFrame: 1100 });
  expect(shot.status, JSON.stringify(shot.body)).toBe(201);
  const id = shot.body.shot.id as number;
  const [thumb] = await db()
    .insert(assets)
    .values({ studioId: studio.id, kind: 'thumbnail', storageKey: `studios/${studio.id}/plates/${unique('t')}.png`, contentType: 'image/png', byteSize: 10, width: 8, height: 8, shotId: id, format: 'png' });
  await db().update(shots).set({ thumbnailAssetId: Number(thumb.insertId) }).where(eq(shots.id, id));
  const v = await supervisor().post(`/api/shots/${id}/versions`, { scene: tinyScene() });
  expect(v.status, JSON.stringify(v.body)).toBe(201);
  await db().update(versions).set({ sharedWithClient: true, reviewState: 'submitted' }).where(eq(versions.id, v.body.version.id));
  shotIds.push(id);
  versionIds.push(v.body.version.id);
}

beforeAll(async () => {
  studio = await makeStudio();
  const show = await supervisor().post(`${api()}/shows`, { code: unique('QC').slice(0, 12), name: 'Counting', frameRate: '24' });
  const empty = await supervisor().post(`${api()}/shows`, { code: unique('QE').slice(0, 12), name: 'Empty', frameRate: '24' });
  showId = show.body.show.id;
  emptyShowId = empty.body.show.id;
  await grantClientShow(studio, showId);
  await addShot();
  // First requests of the sessions write "last active"; the counts below are of requests after that.
  await supervisor().get('/api/me');
  await client().get('/api/me');
});
afterAll(async () => {
  if (versionIds.length) await db().update(versions).set({ sharedWithClient: false }).where(inArray(versions.id, versionIds));
  await closeDb();
});

const shotsPath = () => `${api()}/shots?showId=${showId}&archived=false&sort=code&order=asc&page=1&pageSize=50`;

describe('queries per request', () => {
  it('the shots list takes 2 queries for 1 shot and for 6 (rows, total and thumbnails in one; no query or signing per row)', async () => {
    const one = await counted(supervisor, shotsPath());
    expect(one.body.items).toHaveLength(1);
    expect(one.body.items[0].thumbnailUrl).toMatch(/^https?:\/\//);
    expect(one.queries).toBe(2);
    for (let i = 0; i < 5; i++) await addShot();
    const six = await counted(supervisor, shotsPath());
    expect(six.body.items).toHaveLength(6);
    expect(six.body.total).toBe(6);
    expect(six.body.items.every((s: { thumbnailUrl: string | null }) => typeof s.thumbnailUrl === 'string')).toBe(true);
    expect(six.queries).toBe(2);
    // A client: the rule rides in the same query.
    const seen = await counted(client, shotsPath());
    expect(seen.body.items).toHaveLength(6);
    expect(seen.queries).toBe(2);
  });

  it('a page past the end still has the right total (the show and a count: 4), an empty show 3', async () => {
    const past = await counted(supervisor, `${api()}/shots?showId=${showId}&sort=code&page=3&pageSize=5`);
    expect(past.body).toMatchObject({ items: [], total: 6, page: 3 });
    expect(past.queries).toBe(4);
    const second = await counted(supervisor, `${api()}/shots?showId=${showId}&sort=code&page=2&pageSize=5`);
    expect(second.body.items).toHaveLength(1);
    expect(second.body.total).toBe(6);
    expect(second.queries).toBe(2);
    const empty = await counted(supervisor, `${api()}/shots?showId=${emptyShowId}`);
    expect(empty.body).toMatchObject({ items: [], total: 0 });
    expect(empty.queries).toBe(3);
    // A show the client may not see is still a 404, found by that show query.
    const hidden = await client().get(`${api()}/shots?showId=${emptyShowId}`);
    expect(hidden.status).toBe(404);
  });

  it('a version GET takes 2 queries for the studio, 3 for a client; /api/me takes 1', async () => {
    const v = versionIds[0];
    const studioView = await counted(supervisor, `/api/versions/${v}`);
    expect(studioView.body.version.id).toBe(v);
    expect(studioView.queries).toBe(2);
    const clientView = await counted(client, `/api/versions/${v}`);
    expect(clientView.body.version.id).toBe(v);
    expect(clientView.queries).toBe(3);
    const me = await counted(supervisor, '/api/me');
    expect(me.body.studios.map((s: { id: number }) => s.id)).toContain(studio.id);
    expect(me.queries).toBe(1);
  });
});
