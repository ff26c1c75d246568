// Turnover to editorial against the real app: the approved versions of a show's shots as a ZIP of a CMX 3600 EDL and
// their MP4 exports; a shot without an MP4 is listed as missing; the EDL re-imported into a new show gives back the
// approved shots' record timecodes and durations. Role check and bad input naming the field.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { unzipSync, strFromU8 } from 'fflate';
import { APP, makeStudio, unique, type TestStudio } from '../support/app';
import { db, closeDb } from '../../src/lib/server/db';
import { shots } from '../../src/lib/server/db/schema';
import { QUAY_CUT as CUT, fakeMp4, addVersion as addVersionTo, addMp4 as addMp4To } from '../support/turnover';
import { timecodeToFrames } from '../../src/lib/timecode';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const api = () => `/api/studios/${studio.id}`;
const supervisor = () => studio.members.supervisor.client;

async function newShow() {
  const res = await supervisor().post(`${api()}/shows`, { code: unique('TO').slice(0, 14), name: 'Quay', frameRate: '24' });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.show as { id: number; code: string };
}

async function importCut(showId: number, text: string) {
  const res = await supervisor().post(`${api()}/shows/${showId}/import/confirm`, { format: 'edl', text, options: { codeFrom: 'clip', headHandles: 8, tailHandles: 8 } });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return db().select().from(shots).where(eq(shots.showId, showId)).orderBy(shots.recordIn);
}

const addVersion = (shotId: number, number: number, state: 'approved' | 'submitted') => addVersionTo(studio, shotId, number, state);
const addMp4 = (versionId: number, shotId: number, fileName: string, bytes: Uint8Array) => addMp4To(studio, versionId, shotId, fileName, bytes);

async function download(path: string) {
  const cookie = [...supervisor().cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  return fetch(APP + path, { headers: { cookie } });
}

describe('turnover to editorial', () => {
  it('EDL of the approved versions at their record timecode + their MP4s; a missing MP4 is named; re-import gives the same cut', async () => {
    const show = await newShow();
    const [a, b, c] = await importCut(show.id, CUT);
    // a: v001 approved, v002 submitted → v001 goes; b: v001 approved but never exported as MP4; c: not approved.
    const a1 = await addVersion(a.id, 1, 'approved');
    await addVersion(a.id, 2, 'submitted');
    const b1 = await addVersion(b.id, 1, 'approved');
    await addVersion(c.id, 1, 'submitted');
    const mp4 = fakeMp4('a1');
    await addMp4(a1, a.id, 'QY_0100_v001.mp4', mp4);

    const plan = await supervisor().get(`${api()}/shows/${show.id}/turnover?approval=internal`);
    expect(plan.status, JSON.stringify(plan.body)).toBe(200);
    const t = plan.body.turnover;
    expect(t.items.map((i: any) => [i.code, i.version, i.recordIn, i.recordOut, i.fileName])).toEqual([[a.code, 'v001', '01:00:00:00', '01:00:02:00', 'QY_0100_v001.mp4']]);
    expect(t.missing).toEqual([{ shotId: b.id, code: b.code, version: 'v001', reason: expect.stringMatching(/no MP4 export of v001/) }]);
    expect(t.notApproved).toBe(1);

    // Add the MP4 of b and take the ZIP.
    const mp4b = fakeMp4('b1');
    await addMp4(b1, b.id, 'QY_0200_v001.mp4', mp4b);
    const res = await download(`${api()}/shows/${show.id}/turnover?approval=internal&format=zip`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/zip');
    // Streamed as it is written: no length up front, sent in chunks.
    expect(res.headers.get('content-length')).toBeNull();
    expect(res.headers.get('transfer-encoding')).toBe('chunked');
    expect(res.headers.get('content-disposition')).toContain(`${show.code}_turnover.zip`);
    const files = unzipSync(new Uint8Array(await res.arrayBuffer()));
    const edlName = `${show.code}_turnover.edl`;
    expect(Object.keys(files).sort()).toEqual(['QY_0100_v001.mp4', 'QY_0200_v001.mp4', 'contents.txt', edlName].sort());
    expect(files['QY_0100_v001.mp4']).toEqual(mp4);
    expect(files['QY_0200_v001.mp4']).toEqual(mp4b);
    const edl = strFromU8(files[edlName]);
    expect(edl).toContain('* FROM CLIP NAME: QY_0100_v001.mp4');
    expect(strFromU8(files['contents.txt'])).toContain(edlName);

    // Re-import into a new show: the approved shots come back at the same record timecode with the same durations.
    const again = await newShow();
    const back = await importCut(again.id, edl);
    const dur = (r: { recordIn: string | null; recordOut: string | null }) => timecodeToFrames(r.recordOut!, '24') - timecodeToFrames(r.recordIn!, '24');
    expect(back.map((r) => [r.recordIn, r.recordOut, r.lastFrame - r.firstFrame + 1, r.sourceTimecodeIn])).toEqual(
      [a, b].map((r) => [r.recordIn, r.recordOut, dur(r), r.sourceTimecodeIn]),
    );
    // 48 and 84 frames at 24 fps: 01:00:00:00–01:00:02:00 and 01:00:02:00–01:00:05:12, out exclusive (CMX 3600).
    expect(back.map((r) => r.lastFrame - r.firstFrame + 1)).toEqual([48, 84]);
  });

  it('artists may not take a turnover (403); bad approval or format → 400 naming the field; nothing to turn over → 409', async () => {
    const show = await newShow();
    const artist = await studio.members.artist.client.get(`${api()}/shows/${show.id}/turnover`);
    expect(artist.status).toBe(403);
    const bad = await supervisor().get(`${api()}/shows/${show.id}/turnover?approval=maybe&format=tar`);
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['approval', 'format']);
    const empty = await supervisor().get(`${api()}/shows/${show.id}/turnover?format=zip`);
    expect(empty.status).toBe(409);
    expect(empty.body.error.fields).toHaveProperty('approval');
  });
});
