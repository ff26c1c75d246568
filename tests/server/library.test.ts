// The shot library API against the real app: shows and shots tables (sort, filter, search, pagination), edits,
// inline and bulk changes, imports from EDL and CSV (errors by line, re-import), client visibility, studio isolation.
import { readFileSync } from 'node:fs';
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { grantClientShow, makeStudio, unique, type TestStudio } from '../support/app';
import { db, closeDb } from '../../src/lib/server/db';
import { auditLog, shots, shows, versions } from '../../src/lib/server/db/schema';

let studio: TestStudio;
let other: TestStudio;
beforeAll(async () => {
  [studio, other] = await Promise.all([makeStudio(), makeStudio()]);
});
afterAll(closeDb);

const api = (s: TestStudio = studio) => `/api/studios/${s.id}`;
const owner = () => studio.members.owner.client;
const supervisor = () => studio.members.supervisor.client;

async function newShow(fields: Record<string, unknown> = {}) {
  const res = await supervisor().post(`${api()}/shows`, { code: unique('S').slice(0, 14), name: 'A show', frameRate: '24', ...fields });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  await grantClientShow(studio, res.body.show.id);
  return res.body.show as { id: number; code: string; frameRate: string };
}

async function newShot(showId: number, fields: Record<string, unknown> = {}) {
  const res = await supervisor().post(`${api()}/shots`, { showId, code: unique('SH'), lastFrame: 1100, ...fields });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.shot as { id: number; code: string; firstFrame: number; lastFrame: number; status: string; headHandles: number; tailHandles: number };
}

const countShots = async (showId: number) => Number((await db().select({ n: sql<number>`count(*)` }).from(shots).where(eq(shots.showId, showId)))[0].n);

describe('shows', () => {
  it('creates a show, refuses a code already used (409 naming code) and bad input (400 naming fields), writing nothing', async () => {
    const code = unique('CNB').slice(0, 12);
    const created = await supervisor().post(`${api()}/shows`, { code, name: 'Cannonball', frameRate: '29.97df' });
    expect(created.status).toBe(201);
    expect(created.body.show).toMatchObject({ code, name: 'Cannonball', frameRate: '29.97df', shotCount: 0, archivedAt: null });
    const again = await owner().post(`${api()}/shows`, { code, name: 'Other' });
    expect(again.status).toBe(409);
    expect(again.body.error.fields.code).toMatch(/already used/);
    const before = Number((await db().select({ n: sql<number>`count(*)` }).from(shows).where(eq(shows.studioId, studio.id)))[0].n);
    const bad = await owner().post(`${api()}/shows`, { code: 'has space', name: '', frameRate: '29.97DF' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['code', 'frameRate', 'name']);
    expect(bad.body.error.fields.frameRate).toMatch(/29\.97df/);
    const after = Number((await db().select({ n: sql<number>`count(*)` }).from(shows).where(eq(shows.studioId, studio.id)))[0].n);
    expect(after).toBe(before);
  });

  it('lists with search, sort by code / name / shot count, pagination with a total, and the archived filter', async () => {
    const tag = unique('T').replace('-', '').slice(0, 8).toUpperCase();
    const a = await newShow({ code: `${tag}_A`, name: 'Zulu' });
    const b = await newShow({ code: `${tag}_B`, name: 'Alpha' });
    const c = await newShow({ code: `${tag}_C`, name: 'Mike' });
    for (let i = 0; i < 3; i++) await newShot(b.id);
    await newShot(c.id);
    const list = async (qs: string) => {
      const res = await owner().get(`${api()}/shows?q=${tag}&${qs}`);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      return res.body as { items: { id: number; code: string; shotCount: number }[]; total: number; page: number; pageSize: number };
    };
    expect((await list('sort=code')).items.map((s) => s.id)).toEqual([a.id, b.id, c.id]);
    expect((await list('sort=code&order=desc')).items.map((s) => s.id)).toEqual([c.id, b.id, a.id]);
    expect((await list('sort=name')).items.map((s) => s.id)).toEqual([b.id, c.id, a.id]);
    const byShots = await list('sort=shots&order=desc');
    expect(byShots.items.map((s) => [s.id, s.shotCount])).toEqual([
      [b.id, 3],
      [c.id, 1],
      [a.id, 0],
    ]);
    const page2 = await list('sort=code&pageSize=2&page=2');
    expect(page2).toMatchObject({ total: 3, page: 2, pageSize: 2 });
    expect(page2.items.map((s) => s.id)).toEqual([c.id]);

    const archived = await supervisor().post(`${api()}/shows/${a.id}/archive`, { archived: true });
    expect(archived.status).toBe(200);
    expect(archived.body.show.archivedAt).not.toBeNull();
    expect((await list('')).items.map((s) => s.id)).toEqual([b.id, c.id]);
    expect((await list('archived=true')).items.map((s) => s.id)).toEqual([a.id]);
    expect((await list('archived=all')).total).toBe(3);
    await supervisor().post(`${api()}/shows/${a.id}/archive`, { archived: false });
    expect((await list('')).total).toBe(3);
  });

  it('refuses bad query parameters naming them', async () => {
    const res = await owner().get(`${api()}/shows?pageSize=101&sort=colour&page=0`);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['page', 'pageSize', 'sort']);
  });

  it('edits a show and gets it with counts by status', async () => {
    const show = await newShow();
    const s1 = await newShot(show.id);
    await newShot(show.id, { status: 'on hold' });
    await supervisor().request('PATCH', `${api()}/shots/${s1.id}/workflow`, { status: 'approved' });
    const res = await supervisor().patch(`${api()}/shows/${show.id}`, { name: 'Harbour Wall', frameRate: '25' });
    expect(res.status).toBe(200);
    expect(res.body.show).toMatchObject({ name: 'Harbour Wall', frameRate: '25', statusCounts: { approved: 1, 'on hold': 1 } });
    const empty = await supervisor().patch(`${api()}/shows/${show.id}`, {});
    expect(empty.status).toBe(400);
  });
});

describe('shots', () => {
  let show: { id: number; frameRate: string };
  beforeAll(async () => {
    show = await newShow({ frameRate: '25' });
  });

  it('creates with defaults: first frame 1001 (common practice, no source), the show’s rate, status blocking', async () => {
    const res = await supervisor().post(`${api()}/shots`, { showId: show.id, code: 'LHK_0100', lastFrame: 1072 });
    expect(res.status).toBe(201);
    expect(res.body.shot).toMatchObject({ code: 'LHK_0100', firstFrame: 1001, lastFrame: 1072, frameRate: '25', status: 'blocking', headHandles: 8, tailHandles: 8, versions: [] });
  });

  it('refuses a duplicate code in the show (409 naming code) but allows it in another show', async () => {
    const dup = await supervisor().post(`${api()}/shots`, { showId: show.id, code: 'LHK_0100', lastFrame: 1010 });
    expect(dup.status).toBe(409);
    expect(dup.body.error.fields.code).toMatch(/already used/);
    const elsewhere = await newShow();
    const ok = await supervisor().post(`${api()}/shots`, { showId: elsewhere.id, code: 'LHK_0100', lastFrame: 1010 });
    expect(ok.status).toBe(201);
  });

  it('refuses bad shot input naming each field, writing nothing', async () => {
    const before = await countShots(show.id);
    const backwards = await supervisor().post(`${api()}/shots`, { showId: show.id, code: 'X_0', firstFrame: 1100, lastFrame: 1001 });
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.fields).toEqual({ lastFrame: 'must not be before the cut in' });
    const res = await supervisor().post(`${api()}/shots`, {
      showId: show.id,
      code: 'X_1',
      headHandles: -1,
      tailHandles: 1.5,
      frameRate: '31',
      pixelAspect: 0,
      dueDate: '2025-02-30',
    });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['dueDate', 'frameRate', 'headHandles', 'lastFrame', 'pixelAspect', 'tailHandles']);
    const noShow = await supervisor().post(`${api()}/shots`, { showId: 999999999, code: 'X_2', lastFrame: 1010 });
    expect(noShow.status).toBe(400);
    expect(noShow.body.error.fields.showId).toBeTruthy();
    const otherStudioShow = await other.members.owner.client.post(`${api(other)}/shows`, { code: unique('O').slice(0, 10), name: 'Theirs' });
    const crossed = await supervisor().post(`${api()}/shots`, { showId: otherStudioShow.body.show.id, code: 'X_3', lastFrame: 1010 });
    expect(crossed.status).toBe(400);
    expect(crossed.body.error.fields.showId).toMatch(/no such show/);
    expect(await countShots(show.id)).toBe(before);
  });

  it('accepts only studio members (not clients) as assignees', async () => {
    const artist = studio.members.artist;
    const ok = await newShot(show.id, { assigneeId: artist.id, dueDate: '2031-05-01' });
    expect(ok).toMatchObject({ assigneeId: artist.id, assigneeName: artist.name, dueDate: '2031-05-01' });
    for (const who of [other.members.artist.id, studio.members.client.id, 'nobody']) {
      const res = await supervisor().post(`${api()}/shots`, { showId: show.id, code: unique('A'), lastFrame: 1010, assigneeId: who });
      expect(res.status).toBe(400);
      expect(res.body.error.fields.assigneeId).toMatch(/not an artist, supervisor or owner/);
    }
    const people = await studio.members.artist.client.get(`${api()}/people`);
    expect(people.status).toBe(200);
    const ids = people.body.people.map((p: { userId: string }) => p.userId);
    expect(ids).toContain(artist.id);
    expect(ids).not.toContain(studio.members.client.id);
  });

  it('edits partially, checks last ≥ first against the stored range, and audits the change', async () => {
    const shot = await newShot(show.id, { firstFrame: 1001, lastFrame: 1050 });
    const res = await supervisor().patch(`${api()}/shots/${shot.id}`, { description: 'Impact', lastFrame: 1060 });
    expect(res.status).toBe(200);
    expect(res.body.shot).toMatchObject({ description: 'Impact', firstFrame: 1001, lastFrame: 1060 });
    const bad = await supervisor().patch(`${api()}/shots/${shot.id}`, { firstFrame: 1100 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.lastFrame).toMatch(/before the cut in \(1100\)/);
    const unknown = await supervisor().patch(`${api()}/shots/${shot.id}`, { colour: 'red' });
    expect(unknown.status).toBe(400);
    const [entry] = await db()
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.studioId, studio.id), eq(auditLog.action, 'shot.update'), eq(auditLog.targetId, String(shot.id))));
    expect(entry.detail).toMatchObject({ lastFrame: { from: 1050, to: 1060 } });
  });

  it('lets an artist change status and assignee inline, but not other fields', async () => {
    const shot = await newShot(show.id);
    const artist = studio.members.artist;
    const res = await artist.client.patch(`${api()}/shots/${shot.id}/workflow`, { status: 'in review', assigneeId: artist.id });
    expect(res.status).toBe(200);
    expect(res.body.shot).toMatchObject({ status: 'in review', assigneeId: artist.id });
    const cleared = await artist.client.patch(`${api()}/shots/${shot.id}/workflow`, { assigneeId: null });
    expect(cleared.body.shot.assigneeId).toBeNull();
    const sneaky = await artist.client.patch(`${api()}/shots/${shot.id}/workflow`, { status: 'approved', lastFrame: 2000 });
    expect(sneaky.status).toBe(400);
    const badStatus = await artist.client.patch(`${api()}/shots/${shot.id}/workflow`, { status: 'final' });
    expect(badStatus.status).toBe(400);
    expect(badStatus.body.error.fields.status).toMatch(/blocking, in review, approved, on hold, omitted/);
    expect((await artist.client.patch(`${api()}/shots/${shot.id}`, { status: 'approved' })).status).toBe(403);
  });

  it('changes status in bulk in one transaction, all in this studio or nothing', async () => {
    const a = await newShot(show.id);
    const b = await newShot(show.id);
    const theirShow = await other.members.owner.client.post(`${api(other)}/shows`, { code: unique('O').slice(0, 10), name: 'Theirs' });
    const theirs = await other.members.owner.client.post(`${api(other)}/shots`, { showId: theirShow.body.show.id, code: 'T_1', lastFrame: 1010 });
    const mixed = await supervisor().post(`${api()}/shots/bulk-status`, { ids: [a.id, theirs.body.shot.id], status: 'omitted' });
    expect(mixed.status).toBe(404);
    const statusOf = async (id: number) => (await db().select({ s: shots.status }).from(shots).where(eq(shots.id, id)))[0].s;
    expect(await statusOf(a.id)).toBe('blocking');
    expect(await statusOf(theirs.body.shot.id)).toBe('blocking');
    const ok = await supervisor().post(`${api()}/shots/bulk-status`, { ids: [a.id, b.id], status: 'on hold' });
    expect(ok.status).toBe(200);
    expect(ok.body.updated).toBe(2);
    expect([await statusOf(a.id), await statusOf(b.id)]).toEqual(['on hold', 'on hold']);
    // The activity feed credits every shot of a bulk change, however many (their ids joined run past 64 characters),
    // and no shot that was not in it.
    const many: number[] = [];
    for (let i = 0; i < 30; i++) many.push((await newShot(show.id)).id);
    expect(many.join(',').length).toBeGreaterThan(64);
    expect((await supervisor().post(`${api()}/shots/bulk-status`, { ids: many, status: 'approved' })).status).toBe(200);
    for (const id of [many[0], many[29]]) {
      const feed = await supervisor().get(`${api()}/shots/${id}/activity`);
      expect(feed.status).toBe(200);
      expect(JSON.stringify(feed.body)).toContain('shot.bulk_status');
    }
    const outside = await supervisor().get(`${api()}/shots/${a.id}/activity`);
    expect(outside.body.activity.filter((e: { action: string; detail: { status?: string } }) => e.action === 'shot.bulk_status' && e.detail?.status === 'approved')).toEqual([]);
    const bad = await supervisor().post(`${api()}/shots/bulk-status`, { ids: [], status: 'wet' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['ids', 'status']);
  });

  it('gets a shot with its versions: number, author, date, bake and review state', async () => {
    const shot = await newShot(show.id);
    const author = studio.members.artist;
    await db()
      .insert(versions)
      .values([
        { studioId: studio.id, shotId: shot.id, number: 1, authorId: author.id, scene: {}, sceneHash: 'a', reviewState: 'approved', bakeState: 'baked' },
        { studioId: studio.id, shotId: shot.id, number: 2, authorId: author.id, scene: {}, sceneHash: 'b' },
      ]);
    const res = await owner().get(`${api()}/shots/${shot.id}`);
    expect(res.status).toBe(200);
    expect(res.body.shot.versions.map((v: any) => [v.number, v.authorName, v.bakeState, v.reviewState])).toEqual([
      [2, author.name, 'none', 'draft'],
      [1, author.name, 'baked', 'approved'],
    ]);
    expect(Number.isNaN(Date.parse(res.body.shot.versions[0].createdAt))).toBe(false);
  });

  describe('the shots table', () => {
    let table: { id: number; frameRate: string };
    const made: Record<string, number> = {};
    beforeAll(async () => {
      table = await newShow();
      const artist = studio.members.artist.id;
      const rows: [string, number, string, string | null, string | null, string][] = [
        ['TB_0040', 1040, 'approved', artist, '2031-01-04', 'wave on the wall'],
        ['TB_0010', 1010, 'on hold', null, null, 'can tumbles'],
        ['TB_0030', 1030, 'blocking', artist, '2031-01-02', 'splash crown'],
        ['TB_0020', 1020, 'in review', null, '2031-01-03', 'impact'],
        ['TB_0050', 1050, 'omitted', artist, null, 'runoff: 50%_done'],
      ];
      for (const [code, first, status, assigneeId, dueDate, description] of rows) {
        made[code] = (await newShot(table.id, { code, firstFrame: first, lastFrame: first + 20, status, assigneeId, dueDate, description })).id;
      }
    });
    const codes = async (qs: string) => {
      const res = await studio.members.artist.client.get(`${api()}/shots?showId=${table.id}&${qs}`);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      return (res.body.items as { code: string }[]).map((s) => s.code);
    };

    it('sorts by code, status (workflow order), first frame, due date (none last)', async () => {
      expect(await codes('sort=code')).toEqual(['TB_0010', 'TB_0020', 'TB_0030', 'TB_0040', 'TB_0050']);
      expect(await codes('sort=status')).toEqual(['TB_0030', 'TB_0020', 'TB_0040', 'TB_0010', 'TB_0050']);
      expect(await codes('sort=firstFrame&order=desc')).toEqual(['TB_0050', 'TB_0040', 'TB_0030', 'TB_0020', 'TB_0010']);
      expect(await codes('sort=dueDate')).toEqual(['TB_0030', 'TB_0020', 'TB_0040', 'TB_0010', 'TB_0050']);
      // Descending: ties (no due date) break on id descending too.
      expect(await codes('sort=dueDate&order=desc')).toEqual(['TB_0040', 'TB_0020', 'TB_0030', 'TB_0050', 'TB_0010']);
    });

    it('filters by status (one or several), assignee (or none) and searches code and description', async () => {
      expect(await codes('status=blocking')).toEqual(['TB_0030']);
      expect(await codes(`status=${encodeURIComponent('in review,on hold')}`)).toEqual(['TB_0010', 'TB_0020']);
      expect(await codes(`assignee=${studio.members.artist.id}`)).toEqual(['TB_0030', 'TB_0040', 'TB_0050']);
      expect(await codes('assignee=none')).toEqual(['TB_0010', 'TB_0020']);
      expect(await codes('q=crown')).toEqual(['TB_0030']);
      expect(await codes('q=0020')).toEqual(['TB_0020']);
      // % and _ are searched literally, not as wildcards
      expect(await codes(`q=${encodeURIComponent('50%_')}`)).toEqual(['TB_0050']);
      expect(await codes(`q=${encodeURIComponent('%')}`)).toEqual(['TB_0050']);
      const bad = await owner().get(`${api()}/shots?status=wet`);
      expect(bad.status).toBe(400);
      expect(bad.body.error.fields.status).toBeTruthy();
    });

    it('pages with a stable order and a total, also when the sort column ties', async () => {
      // Shots made within the same millisecond tie on updated: the id tiebreak keeps pages from overlapping.
      const seen: string[] = [];
      for (let page = 1; page <= 3; page++) {
        const res = await owner().get(`${api()}/shots?showId=${table.id}&sort=updated&pageSize=2&page=${page}`);
        expect(res.body.total).toBe(5);
        seen.push(...res.body.items.map((s: { code: string }) => s.code));
      }
      expect(seen.length).toBe(5);
      expect(new Set(seen).size).toBe(5);
      const beyond = await owner().get(`${api()}/shots?showId=${table.id}&pageSize=2&page=4`);
      expect(beyond.body).toMatchObject({ items: [], total: 5 });
    });

    it('lists across the studio, and archived shots only on request', async () => {
      const res = await owner().get(`${api()}/shots?q=TB_00&pageSize=100`);
      expect(res.body.items.map((s: { showCode: string }) => s.showCode)).toContain((await owner().get(`${api()}/shows/${table.id}`)).body.show.code);
      const archived = await supervisor().post(`${api()}/shots/${made.TB_0010}/archive`, { archived: true });
      expect(archived.status).toBe(200);
      expect(await codes('sort=code')).toEqual(['TB_0020', 'TB_0030', 'TB_0040', 'TB_0050']);
      expect(await codes('archived=true')).toEqual(['TB_0010']);
      await supervisor().post(`${api()}/shots/${made.TB_0010}/archive`, { archived: false });
    });
  });
});

// An edit list in the CMX 3600 layout (from memory), 24 fps, with a title, FCM, cuts, a dissolve, comments and a bad line.
const EDL_V1 = [
  'TITLE: HARBOUR WALL CUT 1',
  'FCM: NON-DROP FRAME',
  '',
  '001  A001C001 V     C        10:00:00:00 10:00:03:00 01:00:00:00 01:00:03:00',
  '* FROM CLIP NAME: HW_0100.mov',
  '002  A001C002 V     C        11:00:00:00 11:00:02:00 01:00:03:00 01:00:05:00',
  '* FROM CLIP NAME: HW_0200.mov',
  '003  A001C002 V     C        11:00:02:00 11:00:02:00 01:00:05:00 01:00:05:00',
  '003  A002C001 V     D    024 12:00:00:00 12:00:04:00 01:00:05:00 01:00:09:00',
  '* FROM CLIP NAME: HW_0200.mov',
  '* TO CLIP NAME: HW_0300.mov',
  '004  A002C002 V     C        12:10:00:00 12:10:01:00 01:00:09:00 01:00:1O:00',
].join('\n');

describe('import', () => {
  it('reads a shot as approved by its own versions only (an approved version of another shot changes nothing)', async () => {
    // A shot and an approved version with the same id, in another show: a subquery that compared a version's
    // shot with a bare `id` matched that version for every shot of every show.
    const [{ m }] = await db().select({ m: sql<number>`GREATEST(COALESCE((SELECT MAX(id) FROM shots), 0), COALESCE((SELECT MAX(id) FROM versions), 0)) + 1` }).from(sql`dual`);
    const k = Number(m);
    const elsewhere = await newShow();
    await db().insert(shots).values({ id: k, studioId: studio.id, showId: elsewhere.id, code: unique('AP').slice(0, 20), firstFrame: 1001, lastFrame: 1010, frameRate: '24' });
    await db().insert(versions).values({ id: k, studioId: studio.id, shotId: k, number: 1, scene: {}, sceneHash: unique('h'), reviewState: 'approved', bakeState: 'baked' });

    const show = await newShow({ frameRate: '24' });
    const body = { format: 'edl', text: EDL_V1, options: { headHandles: 8, tailHandles: 8, startFrame: 1001 }, skipErrors: true };
    expect((await supervisor().post(`${api()}/shows/${show.id}/import/confirm`, body)).status).toBe(200);
    const trimmed = EDL_V1.replace('11:00:02:00 01:00:03:00 01:00:05:00', '11:00:01:12 01:00:03:00 01:00:04:12');
    const preview = await supervisor().post(`${api()}/shows/${show.id}/import/preview`, { ...body, text: trimmed });
    expect(preview.body.preview.update).toEqual([expect.objectContaining({ code: 'HW_0200', approved: false })]);
  });

  it('previews an EDL (errors by line), refuses to confirm with errors, then imports the readable lines in one go', async () => {
    const show = await newShow({ frameRate: '24' });
    const body = { format: 'edl', text: EDL_V1, options: { headHandles: 8, tailHandles: 8, startFrame: 1001 } };
    const preview = await supervisor().post(`${api()}/shows/${show.id}/import/preview`, body);
    expect(preview.status).toBe(200);
    const p = preview.body.preview;
    expect(p.title).toBe('HARBOUR WALL CUT 1');
    // 3 s = 72 frames, 2 s = 48, 4 s = 96 at 24 fps; cut in at 1001 + 8 handles (common practice, no source).
    expect(p.create.map((s: any) => [s.code, s.firstFrame, s.lastFrame, s.headHandles, s.tailHandles])).toEqual([
      ['HW_0100', 1009, 1080, 8, 8],
      ['HW_0200', 1009, 1056, 8, 8],
      ['HW_0300', 1009, 1104, 8, 8],
    ]);
    expect(p.errors).toEqual([{ line: 12, message: expect.stringMatching(/timecode/) }]);
    expect(await countShots(show.id)).toBe(0);

    const refused = await supervisor().post(`${api()}/shows/${show.id}/import/confirm`, body);
    expect(refused.status).toBe(422);
    expect(refused.body.error.lines).toEqual([{ line: 12, message: expect.any(String) }]);
    expect(refused.body.error.message).toMatch(/line 12/);
    expect(await countShots(show.id)).toBe(0);

    const done = await supervisor().post(`${api()}/shows/${show.id}/import/confirm`, { ...body, skipErrors: true });
    expect(done.status).toBe(200);
    // The dissolve's zero-length outgoing line (003, 11:00:02:00 to 11:00:02:00) holds no picture of its own: skipped.
    expect(done.body.import.summary).toEqual({ create: 3, update: 0, unchanged: 0, errors: 1, skipped: 1, approvedChanges: 0 });
    const rows = await db().select().from(shots).where(eq(shots.showId, show.id)).orderBy(shots.code);
    expect(rows.map((r) => [r.code, r.firstFrame, r.lastFrame, r.headHandles, r.tailHandles, r.frameRate])).toEqual([
      ['HW_0100', 1009, 1080, 8, 8, '24'],
      ['HW_0200', 1009, 1056, 8, 8, '24'],
      ['HW_0300', 1009, 1104, 8, 8, '24'],
    ]);

    // The editor trims HW_0200 by 12 frames and fixes the bad line: re-import reports the change, no duplicates.
    const v2 = EDL_V1.replace('11:00:02:00 01:00:03:00 01:00:05:00', '11:00:01:12 01:00:03:00 01:00:04:12')
      .replace('01:00:05:00 01:00:05:00', '01:00:04:12 01:00:04:12')
      .replace('01:00:05:00 01:00:09:00', '01:00:04:12 01:00:08:12')
      .replace('01:00:09:00 01:00:1O:00', '01:00:08:12 01:00:09:12')
      .concat('\n* FROM CLIP NAME: HW_0400.mov\n');
    const again = await supervisor().post(`${api()}/shows/${show.id}/import/preview`, { ...body, text: v2 });
    const q = again.body.preview;
    expect(q.errors).toEqual([]);
    expect(q.update).toEqual([expect.objectContaining({ code: 'HW_0200', from: { first: 1009, last: 1056, headHandles: 8, tailHandles: 8 }, to: { first: 1009, last: 1044, headHandles: 8, tailHandles: 8 } })]);
    expect(q.unchanged.map((s: any) => s.code)).toEqual(['HW_0100', 'HW_0300']);
    expect(q.create.map((s: any) => [s.code, s.firstFrame, s.lastFrame])).toEqual([['HW_0400', 1009, 1032]]);
    const applied = await supervisor().post(`${api()}/shows/${show.id}/import/confirm`, { ...body, text: v2 });
    expect(applied.status).toBe(200);
    expect(applied.body.import.summary).toEqual({ create: 1, update: 1, unchanged: 2, errors: 0, skipped: 1, approvedChanges: 0 });
    expect(await countShots(show.id)).toBe(4);
    const [hw200] = await db().select().from(shots).where(and(eq(shots.showId, show.id), eq(shots.code, 'HW_0200')));
    expect([hw200.firstFrame, hw200.lastFrame]).toEqual([1009, 1044]);
    const [entry] = await db()
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.studioId, studio.id), eq(auditLog.action, 'shot.import'), eq(auditLog.targetId, String(show.id))))
      .orderBy(sql`${auditLog.id} desc`)
      .limit(1);
    expect(entry.detail).toMatchObject({ create: 1, update: 1 });
  });

  it('imports a drop-frame EDL into a 29.97 DF show with codes from a pattern', async () => {
    const show = await newShow({ frameRate: '29.97df' });
    const edl = [
      'TITLE: DF',
      'FCM: DROP FRAME',
      '001  T1 V C 00:00:59;28 00:01:00;04 00:00:59;28 00:01:00;04',
      '002  T1 V C 00:01:00;04 00:01:02;04 00:01:00;04 00:01:02;04',
    ].join('\n');
    const res = await supervisor().post(`${api()}/shows/${show.id}/import/confirm`, {
      format: 'edl',
      text: edl,
      options: { codeFrom: 'pattern', pattern: 'DF_{n:03}0', headHandles: 0, tailHandles: 0 },
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const rows = await db().select().from(shots).where(eq(shots.showId, show.id)).orderBy(shots.code);
    // SMPTE ST 12-1 drop-frame rule: 00:00:59;28 → 00:01:00;04 is 4 frames; 2 s of labels from ;04 is 60 frames.
    expect(rows.map((r) => [r.code, r.firstFrame, r.lastFrame, r.frameRate])).toEqual([
      ['DF_0010', 1001, 1004, '29.97df'],
      ['DF_0020', 1001, 1060, '29.97df'],
    ]);
  });

  it('imports a CSV shot list and reports bad rows by line', async () => {
    const show = await newShow();
    const text = 'code,first,last,handles,tail_handles,description\nCSV_010,1001,1040,4,,"Can, tumbling"\nCSV_020,1001,900,4,,backwards\nCSV_030,1001,1030,,10,\n';
    const preview = await supervisor().post(`${api()}/shows/${show.id}/import/preview`, { format: 'csv', text, options: { headHandles: 6, tailHandles: 6 } });
    expect(preview.body.preview.errors).toEqual([{ line: 3, message: expect.stringMatching(/before first/) }]);
    const done = await supervisor().post(`${api()}/shows/${show.id}/import/confirm`, { format: 'csv', text, options: { headHandles: 6, tailHandles: 6 }, skipErrors: true });
    expect(done.status).toBe(200);
    const rows = await db().select().from(shots).where(eq(shots.showId, show.id)).orderBy(shots.code);
    expect(rows.map((r) => [r.code, r.firstFrame, r.lastFrame, r.headHandles, r.tailHandles, r.description])).toEqual([
      ['CSV_010', 1001, 1040, 4, 4, 'Can, tumbling'],
      ['CSV_030', 1001, 1030, 6, 10, null],
    ]);
  });

  it('refuses bad import requests naming the field, and a body over 1 MB with 413', async () => {
    const show = await newShow();
    const url = `${api()}/shows/${show.id}/import/preview`;
    const bad = await supervisor().post(url, { format: 'xml', text: '', options: { codeFrom: 'pattern', headHandles: -2 } });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['format', 'options.headHandles', 'options.pattern', 'text']);
    const big = await supervisor().post(url, { format: 'csv', text: 'code,first,last\n' + 'A,1,2\n'.repeat(200_000) });
    expect(big.status).toBe(413);
    expect(await countShots(show.id)).toBe(0);
  });
});

describe('client visibility and studio isolation', () => {
  let shared: { id: number; code: string };
  let hidden: { id: number; code: string };
  let sharedShot: { id: number };
  let hiddenShot: { id: number };
  beforeAll(async () => {
    shared = await newShow();
    hidden = await newShow();
    sharedShot = await newShot(shared.id);
    hiddenShot = await newShot(hidden.id);
    await db()
      .insert(versions)
      .values([
        { studioId: studio.id, shotId: sharedShot.id, number: 1, scene: {}, sceneHash: 'v1', reviewState: 'submitted', sharedWithClient: true },
        { studioId: studio.id, shotId: sharedShot.id, number: 2, scene: {}, sceneHash: 'v2', reviewState: 'draft' },
        { studioId: studio.id, shotId: hiddenShot.id, number: 1, scene: {}, sceneHash: 'h1', reviewState: 'submitted' },
      ]);
  });
  const client = () => studio.members.client.client;

  it('a client lists only shows with a version shared with clients, and their shots', async () => {
    const showsRes = await client().get(`${api()}/shows?pageSize=100`);
    expect(showsRes.status).toBe(200);
    const ids = showsRes.body.items.map((s: { id: number }) => s.id);
    expect(ids).toContain(shared.id);
    expect(ids).not.toContain(hidden.id);
    expect(showsRes.body.total).toBe(ids.length);
    const shotsRes = await client().get(`${api()}/shots?pageSize=100`);
    const shotIds = shotsRes.body.items.map((s: { id: number }) => s.id);
    expect(shotIds).toContain(sharedShot.id);
    expect(shotIds).not.toContain(hiddenShot.id);
    // The whole studio has more: an artist sees the hidden show too.
    const artistIds = (await studio.members.artist.client.get(`${api()}/shows?pageSize=100`)).body.items.map((s: { id: number }) => s.id);
    expect(artistIds).toContain(hidden.id);
  });

  it('a client gets 404 for other shows and never sees draft or unshared versions', async () => {
    expect((await client().get(`${api()}/shows/${hidden.id}`)).status).toBe(404);
    expect((await client().get(`${api()}/shots/${hiddenShot.id}`)).status).toBe(404);
    expect((await client().get(`${api()}/shots?showId=${hidden.id}`)).status).toBe(404);
    const shot = await client().get(`${api()}/shots/${sharedShot.id}`);
    expect(shot.status).toBe(200);
    expect(shot.body.shot.versions.map((v: { number: number }) => v.number)).toEqual([1]);
    const asArtist = await studio.members.artist.client.get(`${api()}/shots/${sharedShot.id}`);
    expect(asArtist.body.shot.versions.map((v: { number: number }) => v.number)).toEqual([2, 1]);
  });

  it('a client may not change anything (403)', async () => {
    expect((await client().patch(`${api()}/shots/${sharedShot.id}/workflow`, { status: 'approved' })).status).toBe(403);
    expect((await client().post(`${api()}/shows`, { code: 'CL', name: 'x' })).status).toBe(403);
    expect((await client().post(`${api()}/shots/${sharedShot.id}/plates`, { fileName: 'a.png', contentType: 'image/png', byteSize: 10 })).status).toBe(403);
  });

  it('another studio sees nothing: 404 on ids, and its own lists do not include ours', async () => {
    const them = other.members.owner.client;
    expect((await them.get(`${api()}/shows`)).status).toBe(404);
    expect((await them.get(`${api(other)}/shows/${shared.id}`)).status).toBe(404);
    expect((await them.get(`${api(other)}/shots/${sharedShot.id}`)).status).toBe(404);
    expect((await them.patch(`${api(other)}/shots/${sharedShot.id}/workflow`, { status: 'omitted' })).status).toBe(404);
    expect((await them.get(`${api(other)}/shots?showId=${shared.id}`)).status).toBe(404);
    const theirs = await them.get(`${api(other)}/shots?pageSize=100`);
    expect(theirs.body.items.map((s: { id: number }) => s.id)).not.toContain(sharedShot.id);
    const preview = await them.post(`${api(other)}/shows/${shared.id}/import/confirm`, { format: 'csv', text: 'code,first,last\nX,1,2\n' });
    expect(preview.status).toBe(404);
    expect(await countShots(shared.id)).toBe(1);
  });
});

describe('handle convention (studio setting, owner only)', () => {
  // Two 24 fps cuts (CMX 3600 layout, from memory): 48 and 30 frames, record out exclusive.
  const EDL = readFileSync(new URL('../fixtures/edl/two-cuts-24.edl', import.meta.url), 'utf8').trimEnd();

  it('the same EDL imports as cut 1009–… ("1001 is the first head-handle frame") or 1001–… ("1001 is the cut in"); source in kept', async () => {
    const s = await makeStudio();
    const sup = s.members.supervisor.client;
    const owner = s.members.owner.client;
    const importInto = async () => {
      const show = await sup.post(`${api(s)}/shows`, { code: unique('HC').slice(0, 14), name: 'Handles', frameRate: '24' });
      // Head and tail apart (8 and 12) so a swap of the two would show.
      const res = await sup.post(`${api(s)}/shows/${show.body.show.id}/import/confirm`, { format: 'edl', text: EDL, options: { codeFrom: 'clip', headHandles: 8, tailHandles: 12 } });
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      const rows = await db().select().from(shots).where(eq(shots.showId, show.body.show.id)).orderBy(shots.code);
      return rows.map((r) => [r.code, r.firstFrame, r.lastFrame, r.headHandles, r.tailHandles, r.sourceTimecodeIn]);
    };
    expect((await owner.get(`${api(s)}/settings`)).body.settings).toEqual({ handleConvention: 'head-handle' });
    // Default: 1001 on the first head-handle frame (common practice (no source)), so the cut in is 1001 + 8.
    expect(await importInto()).toEqual([
      ['HC_010', 1009, 1056, 8, 12, '01:00:10:00'],
      ['HC_020', 1009, 1038, 8, 12, '02:00:00:00'],
    ]);

    const refused = await sup.patch(`${api(s)}/settings`, { handleConvention: 'cut-in' });
    expect(refused.status).toBe(403);
    const bad = await owner.patch(`${api(s)}/settings`, { handleConvention: 'middle' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('handleConvention');
    const set = await owner.patch(`${api(s)}/settings`, { handleConvention: 'cut-in' });
    expect(set.status, JSON.stringify(set.body)).toBe(200);
    // The cut in is 1001; durations (48, 30 frames) and the source in at the cut in are the same.
    expect(await importInto()).toEqual([
      ['HC_010', 1001, 1048, 8, 12, '01:00:10:00'],
      ['HC_020', 1001, 1030, 8, 12, '02:00:00:00'],
    ]);
  });
});

describe("plate's first frame", () => {
  it('is kept on create and edit (null = the plate starts at the cut in); a bad value → 400 naming plateFirstFrame', async () => {
    const show = await newShow();
    const shot = await newShot(show.id, { firstFrame: 1009, lastFrame: 1056, headHandles: 8, tailHandles: 8, plateFirstFrame: 1001 });
    const [row] = await db().select().from(shots).where(eq(shots.id, shot.id));
    expect(row.plateFirstFrame).toBe(1001);
    const cleared = await supervisor().patch(`${api()}/shots/${shot.id}`, { plateFirstFrame: null });
    expect(cleared.status, JSON.stringify(cleared.body)).toBe(200);
    expect((await db().select().from(shots).where(eq(shots.id, shot.id)))[0].plateFirstFrame).toBeNull();
    const bad = await supervisor().patch(`${api()}/shots/${shot.id}`, { plateFirstFrame: 10.5 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('plateFirstFrame');
  });
});

describe('head and tail handles', () => {
  it('are stored apart; an edit of the head keeps the tail; a tail never stored apart (null) reads as the head', async () => {
    const show = await newShow();
    const shot = await newShot(show.id, { firstFrame: 1009, lastFrame: 1056, headHandles: 8, tailHandles: 16 });
    expect([shot.headHandles, shot.tailHandles]).toEqual([8, 16]);
    const head = await supervisor().patch(`${api()}/shots/${shot.id}`, { headHandles: 4 });
    expect(head.status, JSON.stringify(head.body)).toBe(200);
    expect([head.body.shot.headHandles, head.body.shot.tailHandles]).toEqual([4, 16]);
    // A shot made before head and tail were apart has tail_handles null: the API and the table read the head's count.
    await db().update(shots).set({ headHandles: 6, tailHandles: null }).where(eq(shots.id, shot.id));
    const read = await supervisor().get(`${api()}/shots/${shot.id}`);
    expect([read.body.shot.headHandles, read.body.shot.tailHandles]).toEqual([6, 6]);
    const list = await supervisor().get(`${api()}/shots?showId=${show.id}`);
    expect(list.body.items.map((r: any) => [r.headHandles, r.tailHandles])).toEqual([[6, 6]]);
    // Changing only the head now stores the tail it had (6), so the tail does not silently follow.
    await supervisor().patch(`${api()}/shots/${shot.id}`, { headHandles: 10 });
    expect((await db().select().from(shots).where(eq(shots.id, shot.id)))[0].tailHandles).toBe(6);
    const bad = await supervisor().patch(`${api()}/shots/${shot.id}`, { tailHandles: -3 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('tailHandles');
  });
});
