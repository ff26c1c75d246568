// The one access policy, as clients see it. One studio has clients of two fictional brands (Larkspur Tea, Quillfin
// Bikes), each membership naming its brand's show. Every field a client must not see holds a random sentinel; as each
// client, every GET endpoint and studio page with every fixture id answers 404 or contains no sentinel. Routes with
// two ids, one of them from another studio, answer 404.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { randomBytes } from 'node:crypto';
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { Client, grantClientShow, linkIn, makeStudio, makeUser, membershipId, unique, waitForMail, type TestStudio } from '../support/app';
import { ENDPOINTS } from './endpoints';
import { db, closeDb } from '../../src/lib/server/db';
import { assets, clientShows, memberships, notes, reviewEvents, shots, shows, users, versions } from '../../src/lib/server/db/schema';
import { parseScene, sceneHash } from '../../src/lib/scene';
import { tinyScene } from '../support/scenes';
import { eq } from 'drizzle-orm';

const sentinels: string[] = [];
const secret = (label: string) => {
  const s = `ZZ${label}${randomBytes(6).toString('hex')}`;
  sentinels.push(s);
  return s;
};

interface Brand {
  showId: number;
  sharedShotId: number;
  /** The shared shot's plate, and the plate of the brand's unshared shot. */
  plateIds: [number, number];
  sharedVersionId: number;
  client: Client;
  userId: string;
  /** Codes of this brand's shots: a sentinel for the other brand's client. */
  codes: string[];
}

let studio: TestStudio;
let other: TestStudio;
let otherVersionId: number;
let otherShotId: number;
let otherShowId: number;
const brands: Brand[] = [];
const ids = { show: [] as number[], shot: [] as number[], version: [] as number[], note: [] as number[], asset: [] as number[] };
let otherPlateId: number;

const scene = () => {
  const parsed = parseScene(tinyScene());
  if (!parsed.ok) throw new Error('tiny scene is invalid');
  return parsed.scene;
};

async function addVersion(s: TestStudio, shotId: number, number: number, fields: Partial<typeof versions.$inferInsert>) {
  const sc = scene();
  const [v] = await db().insert(versions).values({ studioId: s.id, shotId, number, scene: sc, sceneHash: sceneHash(sc), bakeState: 'baked', ...fields });
  ids.version.push(Number(v.insertId));
  return Number(v.insertId);
}

async function addShot(s: TestStudio, showId: number, code: string, fields: Partial<typeof shots.$inferInsert> = {}) {
  const [r] = await db()
    .insert(shots)
    .values({ studioId: s.id, showId, code, firstFrame: 1001, lastFrame: 1024, description: secret('desc'), clipName: secret('plate'), ...fields });
  ids.shot.push(Number(r.insertId));
  return Number(r.insertId);
}

/** A ready plate on the shot (made the shot's current plate) whose uploaded file name is a sentinel; returns its id. */
async function addPlate(s: TestStudio, shotId: number) {
  const [a] = await db().insert(assets).values({
    studioId: s.id,
    kind: 'plate',
    storageKey: `studios/${s.id}/shots/${shotId}/plates/${randomBytes(6).toString('hex')}.png`,
    contentType: 'image/png',
    byteSize: 64,
    width: 64,
    height: 36,
    format: 'png',
    shotId,
    meta: { state: 'ready', fileName: secret('platefile'), declaredSize: 64 },
  });
  const id = Number(a.insertId);
  await db().update(shots).set({ plateAssetId: id, plateWidth: 64, plateHeight: 36 }).where(eq(shots.id, shotId));
  ids.asset.push(id);
  return id;
}

async function makeBrand(name: string, assigneeId: string): Promise<Brand> {
  const [sh] = await db().insert(shows).values({ studioId: studio.id, code: name.slice(0, 3).toUpperCase() + randomBytes(2).toString('hex'), name: `${name} spot`, frameRate: '24' });
  const showId = Number(sh.insertId);
  ids.show.push(showId);
  const sharedCode = `SH${randomBytes(4).toString('hex')}`;
  const sharedShotId = await addShot(studio, showId, sharedCode, { assigneeId });
  // Its plate: the client may view the picture, never the file name it was uploaded under.
  const sharedPlateId = await addPlate(studio, sharedShotId);
  // The shared version: its artist comment is the studio's.
  const sharedVersionId = await addVersion(studio, sharedShotId, 1, { sharedWithClient: true, reviewState: 'submitted', comment: secret('comment'), authorId: assigneeId });
  // A draft and a returned version on the same shot, never shared.
  await addVersion(studio, sharedShotId, 2, { reviewState: 'draft', comment: secret('draft') });
  await addVersion(studio, sharedShotId, 3, { reviewState: 'returned', comment: secret('returned') });
  // A note the client may read, and an internal one it may not.
  const [n1] = await db().insert(notes).values({ studioId: studio.id, versionId: sharedVersionId, frame: 1002, body: 'Lovely crown', internal: false });
  const [n2] = await db().insert(notes).values({ studioId: studio.id, versionId: sharedVersionId, frame: 1003, body: secret('internal'), internal: true });
  ids.note.push(Number(n1.insertId), Number(n2.insertId));
  // An unshared shot, and an archived shot whose version was shared before it was archived.
  const unsharedCode = secret('unshared');
  const unshared = await addShot(studio, showId, unsharedCode);
  const unsharedPlateId = await addPlate(studio, unshared);
  await addVersion(studio, unshared, 1, { reviewState: 'submitted', comment: secret('c') });
  const archivedCode = secret('archived');
  const archived = await addShot(studio, showId, archivedCode, { archivedAt: new Date() });
  await addVersion(studio, archived, 1, { sharedWithClient: true, reviewState: 'approved', comment: secret('c') });

  // Who moved the version in review is the studio's: the event's actor carries a sentinel name.
  await db().insert(reviewEvents).values({ studioId: studio.id, versionId: sharedVersionId, actorId: studio.members.supervisor.id, fromState: 'draft', toState: 'submitted' });
  // The clip's meta and the bake's health verdict are the studio's.
  const [clip] = await db().insert(assets).values({
    studioId: studio.id,
    kind: 'clip',
    storageKey: `studios/${studio.id}/clips/${randomBytes(6).toString('hex')}.tdmclip`,
    contentType: 'application/octet-stream',
    byteSize: 64,
    versionId: sharedVersionId,
    meta: { statsKey: secret('statskey'), solverNote: secret('meta') },
  });
  await db().update(versions).set({ clipAssetId: Number(clip.insertId) }).where(eq(versions.id, sharedVersionId));

  const u = await makeUser(`Client of ${name}`);
  await db().insert(memberships).values({ studioId: studio.id, userId: u.id, role: 'client' });
  // An archived show the membership names, with a shared version: hidden like an archived shot.
  const [ash] = await db().insert(shows).values({ studioId: studio.id, code: secret('ashow'), name: secret('archivedshow'), frameRate: '24', archivedAt: new Date() });
  const archivedShowId = Number(ash.insertId);
  ids.show.push(archivedShowId);
  const inArchivedShow = await addShot(studio, archivedShowId, secret('ashot'));
  await addVersion(studio, inArchivedShow, 1, { sharedWithClient: true, reviewState: 'submitted' });
  await db().insert(clientShows).values({ studioId: studio.id, userId: u.id, showId: archivedShowId });
  const client = await new Client().signIn(u.email, u.password);
  return { showId, sharedShotId, plateIds: [sharedPlateId, unsharedPlateId], sharedVersionId, client, userId: u.id, codes: [sharedCode, unsharedCode, archivedCode] };
}

beforeAll(async () => {
  [studio, other] = await Promise.all([makeStudio(), makeStudio()]);
  const assigneeName = secret('assignee');
  await db().update(users).set({ name: assigneeName }).where(eq(users.id, studio.members.artist.id));
  await db().update(users).set({ name: secret('actor') }).where(eq(users.id, studio.members.supervisor.id));
  brands.push(await makeBrand('Larkspur Tea', studio.members.artist.id));
  brands.push(await makeBrand('Quillfin Bikes', studio.members.artist.id));
  for (const b of brands) await grantClientShow(studio, b.showId, b.userId);
  // Another studio's shared version (its client sees it; ours never do).
  const [sh] = await db().insert(shows).values({ studioId: other.id, code: `OT${randomBytes(3).toString('hex')}`, name: 'Theirs' });
  otherShowId = Number(sh.insertId);
  otherShotId = await addShot(other, otherShowId, `OT${randomBytes(4).toString('hex')}`);
  otherVersionId = await addVersion(other, otherShotId, 1, { sharedWithClient: true, reviewState: 'submitted' });
  otherPlateId = await addPlate(other, otherShotId);
  await grantClientShow(other, otherShowId);
}, 120_000);
afterAll(closeDb);

/** Every string anywhere in a parsed JSON answer (keys too), or the raw text of an HTML one. */
function strings(body: unknown): string[] {
  if (typeof body === 'string') return [body];
  if (Array.isArray(body)) return body.flatMap(strings);
  if (body && typeof body === 'object') return Object.entries(body).flatMap(([k, v]) => [k, ...strings(v)]);
  return body === null || body === undefined ? [] : [String(body)];
}

function leaks(body: unknown, forbidden: string[]): string[] {
  const all = strings(body).join('\n');
  return forbidden.filter((s) => all.includes(s));
}

function pageRoutes(): string[] {
  const dir = path.resolve(__dirname, '../../src/pages');
  const out: string[] = [];
  const visit = (p: string) => {
    for (const name of readdirSync(p)) {
      const full = path.join(p, name);
      if (statSync(full).isDirectory()) visit(full);
      else if (name.endsWith('.astro')) out.push('/' + path.relative(dir, full).replace(/\.astro$/, '').replace(/(^|\/)index$/, ''));
    }
  };
  visit(path.join(dir, 'studios'));
  return out;
}

/** Concrete paths for a route template, one per combination of fixture ids for its parameters. */
function expand(route: string): string[] {
  const values: Record<string, (string | number)[]> = {
    studioId: [studio.id],
    slug: [studio.slug],
    showId: ids.show,
    shotId: ids.shot,
    versionId: ids.version,
    noteId: ids.note,
    assetId: ids.asset,
  };
  let paths = [route];
  for (const m of route.matchAll(/\[(\w+)\]/g)) {
    const vals = values[m[1]];
    if (!vals) return []; // a parameter with no fixture (tokens, members, links): covered by the authorization matrix
    paths = paths.flatMap((p) => vals.map((v) => p.replace(`[${m[1]}]`, String(v))));
  }
  return paths;
}

describe('client visibility: two brands in one studio', () => {
  it('each client sees its own show and its shared version only', async () => {
    for (const [i, b] of brands.entries()) {
      const them = brands[1 - i];
      const showsRes = await b.client.get(`/api/studios/${studio.id}/shows`);
      expect(showsRes.status).toBe(200);
      expect(showsRes.body.items.map((s: { id: number }) => s.id)).toEqual([b.showId]);
      const shotsRes = await b.client.get(`/api/studios/${studio.id}/shots`);
      expect(shotsRes.status).toBe(200);
      expect(shotsRes.body.items.map((s: { id: number }) => s.id)).toEqual([b.sharedShotId]);
      const own = await b.client.get(`/api/shots/${b.sharedShotId}/versions`);
      expect(own.status).toBe(200);
      expect(own.body.versions.map((v: { id: number }) => v.id)).toEqual([b.sharedVersionId]);
      expect((await b.client.get(`/api/versions/${b.sharedVersionId}`)).status).toBe(200);
      // The shared shot's plate may be viewed; the unshared shot's is not there, nor the other brand's.
      expect((await b.client.get(`/api/studios/${studio.id}/plates/${b.plateIds[0]}`)).status).toBe(200);
      expect((await b.client.get(`/api/studios/${studio.id}/plates/${b.plateIds[1]}`)).status).toBe(404);
      expect((await b.client.get(`/api/studios/${studio.id}/plates/${them.plateIds[0]}`)).status).toBe(404);
      // The other brand's shared version, shot and show do not exist for this client.
      expect((await b.client.get(`/api/versions/${them.sharedVersionId}`)).status).toBe(404);
      expect((await b.client.get(`/api/shots/${them.sharedShotId}/versions`)).status).toBe(404);
      expect((await b.client.get(`/api/studios/${studio.id}/shows/${them.showId}`)).status).toBe(404);
    }
  });

  it("a client is not shown the shot's status, the bake's health verdict or the clip's meta", async () => {
    for (const b of brands) {
      const shot = await b.client.get(`/api/studios/${studio.id}/shots/${b.sharedShotId}`);
      expect(shot.status).toBe(200);
      expect(JSON.stringify(shot.body)).not.toMatch(/"status":"(blocking|in review|approved|on hold|omitted)"/);
      const clip = await b.client.get(`/api/versions/${b.sharedVersionId}/clip`);
      expect(clip.status).toBe(200);
      expect(clip.body.health).toBeNull();
      expect(clip.body.meta).toEqual({});
      const history = await b.client.get(`/api/versions/${b.sharedVersionId}/review`);
      expect(history.status).toBe(200);
      expect(JSON.stringify(history.body)).toContain('The studio');
    }
  });

  it('a client with no shows named sees nothing: 200 with no items, never a shot', async () => {
    const u = await makeUser('Unscoped client');
    await db().insert(memberships).values({ studioId: studio.id, userId: u.id, role: 'client' });
    const c = await new Client().signIn(u.email, u.password);
    expect((await c.get(`/api/studios/${studio.id}/shots`)).body.items).toEqual([]);
    expect((await c.get(`/api/versions/${brands[0].sharedVersionId}`)).status).toBe(404);
  });

  it('as each client, every GET endpoint and studio page with every fixture id answers 404 or holds no sentinel', async () => {
    const routes = [...new Set(ENDPOINTS.filter((e) => e.method === 'GET').map((e) => e.route)), ...pageRoutes()];
    let checked = 0;
    let answered = 0;
    for (const [i, b] of brands.entries()) {
      const forbidden = [...sentinels, ...brands[1 - i].codes, ...b.codes.slice(1)];
      for (const route of routes) {
        for (const p of expand(route)) {
          const res = await b.client.get(p);
          checked++;
          expect(res.status, `${p} → ${res.status}`).toBeLessThan(500);
          if (res.status === 404) continue;
          answered++;
          expect(leaks(res.body, forbidden), `${p} (${res.status}) leaks`).toEqual([]);
        }
      }
    }
    // The walk really reached answers (not a wall of 404s).
    expect(checked).toBeGreaterThan(100);
    expect(answered).toBeGreaterThan(10);
  }, 300_000);

  it('every route with two ids, one from another studio, answers 404', async () => {
    const mixed = (route: string) => {
      const names = [...route.matchAll(/\[(\w+)\]/g)].map((m) => m[1]);
      if (names.length < 2) return [];
      const ours: Record<string, string | number> = { studioId: studio.id, slug: studio.slug, showId: brands[0].showId, shotId: brands[0].sharedShotId, versionId: brands[0].sharedVersionId, noteId: ids.note[0], assetId: ids.asset[0] };
      const theirs: Record<string, string | number> = { studioId: other.id, slug: other.slug, showId: otherShowId, shotId: otherShotId, versionId: otherVersionId, assetId: otherPlateId };
      if (!names.every((n) => n in ours)) return [];
      // Each parameter in turn from the other studio, the rest ours.
      return names.filter((n) => n in theirs).map((odd) => names.reduce((p, n) => p.replace(`[${n}]`, String(n === odd ? theirs[n] : ours[n])), route));
    };
    const routes = [...new Set([...ENDPOINTS.filter((e) => e.method === 'GET').map((e) => e.route), ...pageRoutes()])];
    const paths = routes.flatMap(mixed);
    expect(paths.length).toBeGreaterThan(3);
    // The owner may call every route: only the other studio's id stops it.
    for (const p of paths) expect((await studio.members.owner.client.get(p)).status, p).toBe(404);
    // A client is refused routes above its role before any id is looked at (403 confirms nothing); the rest are 404.
    for (const p of paths) expect([403, 404], p).toContain((await brands[0].client.get(p)).status);
  });

  it('every write route with two ids, one from another studio, answers 404 and changes nothing', async () => {
    const ours: Record<string, number> = { studioId: studio.id, showId: brands[0].showId, shotId: brands[0].sharedShotId, versionId: brands[0].sharedVersionId, noteId: ids.note[0]!, assetId: ids.asset[0]! };
    const theirs: Record<string, number> = { studioId: other.id, showId: otherShowId, shotId: otherShotId, versionId: otherVersionId, assetId: otherPlateId };
    const calls = ENDPOINTS.filter((e) => e.method !== 'GET').flatMap((e) => {
      const names = [...e.route.matchAll(/\[(\w+)\]/g)].map((m) => m[1]!);
      if (names.length < 2 || !names.every((n) => n in ours)) return [];
      return names.filter((n) => n in theirs).map((odd) => ({ e, path: names.reduce((p, n) => p.replace(`[${n}]`, String(n === odd ? theirs[n] : ours[n])), e.route) }));
    });
    expect(calls.length).toBeGreaterThan(10);
    const before = JSON.stringify(await db().select().from(shots).where(eq(shots.studioId, other.id)));
    // A valid body for the route, so only the other studio's id can stop it; the owner may call every route.
    for (const { e, path: p } of calls) {
      const res = await studio.members.owner.client.request(e.method, p, e.body?.(studio) ?? {});
      expect(res.status, `${e.method} ${p} → ${JSON.stringify(res.body)}`).toBe(404);
    }
    expect(JSON.stringify(await db().select().from(shots).where(eq(shots.studioId, other.id)))).toBe(before);
  });

  it('an invited client sees the shows its invitation named; the owner changes them on the membership', async () => {
    const owner = studio.members.owner.client;
    const email = `${unique('brand')}@test.example`;
    const bad = await owner.post(`/api/studios/${studio.id}/invitations`, { email, role: 'client', showIds: [otherShowId] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('showIds');
    const made = await owner.post(`/api/studios/${studio.id}/invitations`, { email, role: 'client', showIds: [brands[0].showId] });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    const token = linkIn(await waitForMail(email)).split('/').pop()!;
    const accepted = await new Client().post(`/api/invitations/${token}/accept`, { name: 'Brand Person', password: 'a-long-enough-pw' });
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200);
    const c = await new Client().signIn(email, 'a-long-enough-pw');
    const seen = async () => ((await c.get(`/api/studios/${studio.id}/shows`)).body.items as { id: number }[]).map((s) => s.id);
    expect(await seen()).toEqual([brands[0].showId]);
    const [u] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
    const memberId = await membershipId(studio.id, u.id);
    expect((await studio.members.supervisor.client.patch(`/api/studios/${studio.id}/members/${memberId}`, { showIds: [brands[1].showId] })).status).toBe(403);
    const moved = await owner.patch(`/api/studios/${studio.id}/members/${memberId}`, { showIds: [brands[1].showId] });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    expect(await seen()).toEqual([brands[1].showId]);
    expect((await c.get(`/api/versions/${brands[0].sharedVersionId}`)).status).toBe(404);
    // Only a client membership has shows.
    const artistMember = await membershipId(studio.id, studio.members.artist.id);
    expect((await owner.patch(`/api/studios/${studio.id}/members/${artistMember}`, { showIds: [] })).status).toBe(404);
  });
});
