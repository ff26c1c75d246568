// The inbox's marks: a version sent back stays in the artist's inbox while they save drafts (until the next version
// is submitted, or they dismiss it); single items are marked read one by one (an assignment, a version, one note),
// opening the inbox page marks nothing, opening the shot or the version reads it, and "mark all read" reads all.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { makeStudio, type TestStudio } from '../support/app';
import { tinyScene } from '../support/scenes';
import { makeShot } from './endpoints';
import { closeDb, db } from '../../src/lib/server/db';
import { versions } from '../../src/lib/server/db/schema';

let studio: TestStudio;
let other: TestStudio;
beforeAll(async () => {
  [studio, other] = await Promise.all([makeStudio(), makeStudio()]);
});
afterAll(closeDb);

const artist = () => studio.members.artist.client;
const supervisor = () => studio.members.supervisor.client;
const inbox = async () => {
  const res = await artist().get(`/api/studios/${studio.id}/inbox`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body;
};
const read = (body: unknown) => artist().post(`/api/studios/${studio.id}/inbox/read`, body);

/** A version of the shot saved by the artist and marked baked (bakes are not what this test is about). */
async function saved(shotId: number, seed: number): Promise<number> {
  const res = await artist().post(`/api/shots/${shotId}/versions`, { scene: tinyScene(10, seed), comment: `pass ${seed}` });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  await db().update(versions).set({ bakeState: 'baked' }).where(eq(versions.id, res.body.version.id));
  return res.body.version.id;
}

/** Saved, submitted and sent back with a comment (and a note pinned to a frame when `note` is given). */
async function returned(shotId: number, seed: number, comment: string, note?: string): Promise<number> {
  const id = await saved(shotId, seed);
  expect((await artist().post(`/api/versions/${id}/review/submit`, {})).status).toBe(200);
  if (note) expect((await supervisor().post(`/api/versions/${id}/notes`, { frame: 1003, body: note })).status).toBe(201);
  const back = await supervisor().post(`/api/versions/${id}/review/decide`, { decision: 'returned', comment });
  expect(back.status, JSON.stringify(back.body)).toBe(200);
  return id;
}

describe('a version sent back stays in the inbox', () => {
  it('while drafts are saved after it, until the next version is submitted', async () => {
    const shotId = await makeShot(studio);
    const v1 = await returned(shotId, 1, 'lower the crown', 'the crown peaks here');
    expect((await inbox()).returned.map((r: any) => r.versionId)).toContain(v1);

    // a draft saved after it supersedes v001, which still waits for its answer, with the return's comment
    const v2 = await saved(shotId, 2);
    const [row] = await db().select().from(versions).where(eq(versions.id, v1));
    expect(row.reviewState).toBe('superseded');
    let box = await inbox();
    const item = box.returned.find((r: any) => r.versionId === v1);
    expect(item).toMatchObject({ lastEvent: { comment: 'lower the crown' }, nextVersion: { id: v2, number: 2, reviewState: 'draft' } });
    expect(box.counts.returned).toBe(box.returned.length);
    // its unread note stays among the new notes too
    expect(box.newNotes.find((r: any) => r.versionId === v1)?.notes.map((n: any) => n.body)).toEqual(['the crown peaks here']);
    expect(box.counts.newNotes).toBe(box.newNotes.reduce((n: number, r: any) => n + r.notes.length, 0));

    // another draft: still there, now pointing at v003
    const v3 = await saved(shotId, 3);
    box = await inbox();
    expect(box.returned.find((r: any) => r.versionId === v1)?.nextVersion).toMatchObject({ id: v3, number: 3 });

    // the version page of the superseded v001 still shows what to change and the way to the next version
    const page = String((await artist().get(`/studios/${studio.slug}/versions/${v1}`)).body);
    expect(page).toContain('returned-banner');
    expect(page).toContain('lower the crown');

    // v003 submitted: that answers the return
    expect((await artist().post(`/api/versions/${v3}/review/submit`, {})).status).toBe(200);
    box = await inbox();
    expect(box.returned.map((r: any) => r.versionId)).not.toContain(v1);
    expect(box.counts.returned).toBe(box.returned.length);
    expect(box.newNotes.find((r: any) => r.versionId === v1)).toBeUndefined();
  });

  it('until the artist dismisses it (their own inbox only; twice is harmless)', async () => {
    const shotId = await makeShot(studio);
    const v1 = await returned(shotId, 4, 'try a wider tank');
    await saved(shotId, 5);
    expect((await inbox()).returned.map((r: any) => r.versionId)).toContain(v1);
    const res = await artist().post(`/api/studios/${studio.id}/inbox/dismiss`, { versionId: v1 });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.returned.map((r: any) => r.versionId)).not.toContain(v1);
    expect((await artist().post(`/api/studios/${studio.id}/inbox/dismiss`, { versionId: v1 })).status).toBe(200);
    expect((await inbox()).returned.map((r: any) => r.versionId)).not.toContain(v1);

    // bad input names the field; a version of another studio is 404
    const bad = await artist().post(`/api/studios/${studio.id}/inbox/dismiss`, { versionId: 'one' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('versionId');
    const otherShot = await makeShot(other);
    const foreign = await other.members.artist.client.post(`/api/shots/${otherShot}/versions`, { scene: tinyScene(10, 6) });
    expect((await artist().post(`/api/studios/${studio.id}/inbox/dismiss`, { versionId: foreign.body.version.id })).status).toBe(404);
  });
});

describe('marking inbox items read one by one', () => {
  it('an assignment, one note, a version, then everything; the inbox page itself reads nothing', async () => {
    const shotId = await makeShot(studio);
    expect((await supervisor().patch(`/api/studios/${studio.id}/shots/${shotId}/workflow`, { assigneeId: studio.members.artist.id })).status).toBe(200);
    const v1 = await saved(shotId, 7);
    expect((await artist().post(`/api/versions/${v1}/review/submit`, {})).status).toBe(200);
    const n1 = await supervisor().post(`/api/versions/${v1}/notes`, { frame: 1002, body: 'crest too sharp' });
    const n2 = await supervisor().post(`/api/versions/${v1}/notes`, { frame: 1006, body: 'spray too dense' });
    expect([n1.status, n2.status]).toEqual([201, 201]);
    expect((await supervisor().post(`/api/versions/${v1}/review/decide`, { decision: 'returned', comment: 'see the notes' })).status).toBe(200);

    let box = await inbox();
    expect(box.assigned.find((a: any) => a.shotId === shotId)?.unread).toBe(true);
    expect(box.returned.find((r: any) => r.versionId === v1)?.unread).toBe(true);
    expect(box.newNotes.find((r: any) => r.versionId === v1)?.notes.map((n: any) => n.body)).toEqual(['crest too sharp', 'spray too dense']);

    // opening the inbox page marks nothing read
    expect((await artist().get(`/studios/${studio.slug}/inbox`)).status).toBe(200);
    box = await inbox();
    expect(box.assigned.find((a: any) => a.shotId === shotId)?.unread).toBe(true);

    // the assignment alone
    const res = await read({ items: [{ type: 'shot', id: shotId }] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.assigned.find((a: any) => a.shotId === shotId)?.unread).toBe(false);
    expect(res.body.returned.find((r: any) => r.versionId === v1)?.unread).toBe(true);

    // one note: the other stays new
    const oneNote = await read({ items: [{ type: 'note', id: n1.body.note.id }] });
    expect(oneNote.status, JSON.stringify(oneNote.body)).toBe(200);
    expect(oneNote.body.newNotes.find((r: any) => r.versionId === v1)?.notes.map((n: any) => n.body)).toEqual(['spray too dense']);
    expect(oneNote.body.returned.find((r: any) => r.versionId === v1)?.unread).toBe(true);

    // the version: its notes are read and its return no longer counts as new (it stays listed: it still asks)
    const version = await read({ items: [{ type: 'version', id: v1 }] });
    expect(version.body.newNotes.find((r: any) => r.versionId === v1)).toBeUndefined();
    expect(version.body.returned.find((r: any) => r.versionId === v1)).toMatchObject({ unread: false });

    // a new assignment, then opening the shot page reads it
    const shot2 = await makeShot(studio);
    expect((await supervisor().patch(`/api/studios/${studio.id}/shots/${shot2}/workflow`, { assigneeId: studio.members.artist.id })).status).toBe(200);
    expect((await inbox()).assigned.find((a: any) => a.shotId === shot2)?.unread).toBe(true);
    expect((await artist().get(`/studios/${studio.slug}/shots/${shot2}`)).status).toBe(200);
    expect((await inbox()).assigned.find((a: any) => a.shotId === shot2)?.unread).toBe(false);

    // another note arrives; "mark all read" reads it and everything else
    expect((await supervisor().post(`/api/versions/${v1}/notes`, { frame: 1004, body: 'one more' })).status).toBe(201);
    const shot3 = await makeShot(studio);
    expect((await supervisor().patch(`/api/studios/${studio.id}/shots/${shot3}/workflow`, { assigneeId: studio.members.artist.id })).status).toBe(200);
    box = await inbox();
    expect(box.unread.total).toBeGreaterThan(0);
    const all = await read({ all: true });
    expect(all.status).toBe(200);
    expect(all.body.unread.total).toBe(0);
    expect(all.body.counts.newNotes).toBe(0);
  });

  it('refuses bad input naming the field, and items of another studio', async () => {
    for (const [body, field] of [
      [{}, 'items'],
      [{ items: [] }, 'items'],
      [{ items: [{ type: 'show', id: 1 }] }, 'items.0.type'],
      [{ items: [{ type: 'note', id: -3 }] }, 'items.0.id'],
      [{ all: false }, 'all'],
    ] as const) {
      const res = await read(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.fields, JSON.stringify(res.body)).toHaveProperty([field]);
    }
    const otherShot = await makeShot(other);
    expect((await read({ items: [{ type: 'shot', id: otherShot }] })).status).toBe(404);
    const foreign = await other.members.artist.client.post(`/api/shots/${otherShot}/versions`, { scene: tinyScene(10, 8) });
    const note = await other.members.supervisor.client.post(`/api/versions/${foreign.body.version.id}/notes`, { frame: 1002, body: 'theirs' });
    expect(note.status).toBe(201);
    expect((await read({ items: [{ type: 'note', id: note.body.note.id }] })).status).toBe(404);
    expect((await read({ items: [{ type: 'version', id: foreign.body.version.id }] })).status).toBe(404);
  });
});
