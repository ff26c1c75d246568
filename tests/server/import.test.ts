// EDL import through the API: skipped events reported with the reason, default codes without plate suffixes, codes
// adjusted per line, a range change on an approved shot applied only when ticked, show codes as short as the hint.
// The edit lists are written in the CMX 3600 layout (from memory: event, reel, track, transition, source in/out,
// record in/out; record out exclusive); plate suffixes are common practice (no source).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { makeStudio, unique, type TestStudio } from '../support/app';
import { db, closeDb } from '../../src/lib/server/db';
import { shots } from '../../src/lib/server/db/schema';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const sup = () => studio.members.supervisor.client;
const edl = (secondOut: string) =>
  [
    'TITLE: QUAY WALL CUT 4',
    'FCM: NON-DROP FRAME',
    '001  A020C001 V     C        11:00:00:00 11:00:02:00 01:00:00:00 01:00:02:00',
    '* FROM CLIP NAME: QW_0010_plate.exr',
    '002  A020C002 A2    C        11:10:00:00 11:10:02:00 01:00:00:00 01:00:02:00',
    '* FROM CLIP NAME: QW_0010_room_tone.wav',
    `003  A020C003 V     C        11:20:00:00 11:20:01:00 01:00:02:00 ${secondOut}`,
    '* FROM CLIP NAME: QW_0020_bg_v02.mov',
  ].join('\n');

describe('EDL import', () => {
  it('lists the sound event as skipped, strips plate suffixes, takes typed codes; an approved shot keeps its range unless ticked', async () => {
    const show = await sup().post(`/api/studios/${studio.id}/shows`, { code: unique('Q').slice(0, 12), name: 'Quay', frameRate: '24' });
    expect(show.status, JSON.stringify(show.body)).toBe(201);
    const base = `/api/studios/${studio.id}/shows/${show.body.show.id}/import`;
    const options = { codeFrom: 'clip', headHandles: 8, tailHandles: 8, startFrame: 1001 }; // 1001: common practice (no source)

    const preview = await sup().post(`${base}/preview`, { format: 'edl', text: edl('01:00:03:00'), options });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    expect(preview.body.preview.create.map((s: { code: string }) => s.code)).toEqual(['QW_0010', 'QW_0020']);
    expect(preview.body.preview.skipped).toEqual([expect.objectContaining({ line: 5, event: '002', track: 'A2', reason: expect.stringMatching(/sound only/) })]);
    expect(preview.body.preview.summary).toMatchObject({ create: 2, skipped: 1 });

    // The user adjusts one default code in the preview; a bad one is an error on its line.
    const badCode = await sup().post(`${base}/preview`, { format: 'edl', text: edl('01:00:03:00'), options: { ...options, codes: { '7': 'QW 0020' } } });
    expect(badCode.body.preview.errors.map((e: { line: number }) => e.line)).toEqual([7]);
    const done = await sup().post(`${base}/confirm`, { format: 'edl', text: edl('01:00:03:00'), options: { ...options, codes: { '7': 'QW_0025' } } });
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect(done.body.import.created.map((s: { code: string }) => s.code)).toEqual(['QW_0010', 'QW_0025']);
    expect(done.body.import.skipped).toHaveLength(1);

    // QW_0025 is approved; the recut makes it 12 frames longer (01:00:02:00–01:00:03:12 = 36 frames at 24 fps,
    // SMPTE ST 12-1 non-drop counting: cut in 1009, cut out 1044).
    const approvedId = done.body.import.created[1].id;
    await db().update(shots).set({ status: 'approved' }).where(eq(shots.id, approvedId));
    const recut = { format: 'edl', text: edl('01:00:03:12'), options: { ...options, codes: { '7': 'QW_0025' } } };
    const flagged = await sup().post(`${base}/preview`, recut);
    expect(flagged.body.preview.update).toEqual([expect.objectContaining({ id: approvedId, approved: true, to: expect.objectContaining({ first: 1009, last: 1044 }) })]);
    expect(flagged.body.preview.summary.approvedChanges).toBe(1);

    const unticked = await sup().post(`${base}/confirm`, recut);
    expect(unticked.status).toBe(200);
    expect(unticked.body.import.updated).toEqual([]);
    expect(unticked.body.import.kept.map((k: { id: number }) => k.id)).toEqual([approvedId]);
    let [row] = await db().select().from(shots).where(eq(shots.id, approvedId));
    expect([row.firstFrame, row.lastFrame]).toEqual([1009, 1032]);

    const bad = await sup().post(`${base}/confirm`, { ...recut, confirmApproved: ['x'] });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(['confirmApproved.0']);

    const ticked = await sup().post(`${base}/confirm`, { ...recut, confirmApproved: [approvedId] });
    expect(ticked.status, JSON.stringify(ticked.body)).toBe(200);
    expect(ticked.body.import.updated.map((u: { id: number }) => u.id)).toEqual([approvedId]);
    [row] = await db().select().from(shots).where(eq(shots.id, approvedId));
    expect([row.firstFrame, row.lastFrame]).toEqual([1009, 1044]);
  });

  it('a show code longer than the form hint allows (16) is refused naming the field', async () => {
    const long = await sup().post(`/api/studios/${studio.id}/shows`, { code: 'ABCDEFGHIJKLMNOPQRSTUVWXYZ', name: 'Too long a code', frameRate: '24' });
    expect(long.status).toBe(400);
    expect(long.body.error.fields.code).toMatch(/16 characters at most/);
    const ok = await sup().post(`/api/studios/${studio.id}/shows`, { code: unique('S').slice(0, 16).padEnd(16, '0'), name: 'Sixteen', frameRate: '24' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
  });
});
