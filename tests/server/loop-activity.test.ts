// The review loop as the shot's activity and the inbox record it: assignment, versions saved, real bakes, submit,
// return, a draft saved in between, resubmission, approval and a shot detail change, read back in order and in words;
// the inbox's assignments and unread counts (an assignment read by opening the shot); the version page's default compare partner (the version sent back).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { makeStudio, type TestStudio } from '../support/app';
import { bakedVersion } from '../support/bake';
import { tinyScene } from '../support/scenes';
import { makeShot } from './endpoints';
import { closeDb } from '../../src/lib/server/db';
import { activityLine } from '../../src/lib/review/activity';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const artist = () => studio.members.artist.client;
const supervisor = () => studio.members.supervisor.client;

describe('the loop in the shot activity and the inbox', () => {
  it('records every step in order with who, and the inbox asks the right person', async () => {
    const shotId = await makeShot(studio);
    const inboxOf = async (who: typeof artist) => {
      const res = await who().get(`/api/studios/${studio.id}/inbox`);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      return res.body;
    };

    // assigned: it shows in the artist's inbox, unread until they open the shot
    const assign = await supervisor().patch(`/api/studios/${studio.id}/shots/${shotId}/workflow`, { assigneeId: studio.members.artist.id });
    expect(assign.status, JSON.stringify(assign.body)).toBe(200);
    let inbox = await inboxOf(artist);
    const assigned = inbox.assigned.find((a: any) => a.shotId === shotId);
    expect(assigned).toMatchObject({ unread: true, assignedBy: studio.members.supervisor.name });
    expect(inbox.counts.assigned).toBeGreaterThanOrEqual(1);
    expect(inbox.unread.assigned).toBeGreaterThanOrEqual(1);
    expect(inbox.counts.total).toBeGreaterThanOrEqual(inbox.counts.assigned);
    const page = await artist().get(`/studios/${studio.slug}/shots/${shotId}`);
    expect(page.status).toBe(200);
    inbox = await inboxOf(artist);
    expect(inbox.assigned.find((a: any) => a.shotId === shotId).unread).toBe(false);
    expect(inbox.unread.assigned).toBe(0);

    // v001 baked for real, submitted, sent back
    const v1 = await bakedVersion(artist(), shotId, 1);
    expect((await artist().post(`/api/versions/${v1}/review/submit`, { comment: 'first pass' })).status).toBe(200);
    const ret = await supervisor().post(`/api/versions/${v1}/review/decide`, { decision: 'returned', comment: 'crown too tall' });
    expect(ret.status, JSON.stringify(ret.body)).toBe(200);
    inbox = await inboxOf(artist);
    expect(inbox.returned.map((r: any) => r.versionId)).toContain(v1);
    expect(inbox.returned.find((r: any) => r.versionId === v1)).toMatchObject({ unread: true, lastEvent: { comment: 'crown too tall' } });
    // the returned version's page offers the next version from its scene
    const v1Page = await artist().get(`/studios/${studio.slug}/versions/${v1}`);
    expect(String(v1Page.body)).toContain(`/shots/${shotId}/edit?from=${v1}`);
    expect(String(v1Page.body)).toContain('crown too tall');

    // a draft saved in between (never submitted), then v003 baked and submitted
    const draft = await artist().post(`/api/shots/${shotId}/versions`, { scene: tinyScene(12, 2), comment: 'try' });
    expect(draft.status).toBe(201);
    const v3 = await bakedVersion(artist(), shotId, 3);
    expect((await artist().post(`/api/versions/${v3}/review/submit`, {})).status).toBe(200);
    expect((await inboxOf(supervisor)).toReview.map((r: any) => r.versionId)).toContain(v3);
    // compare from v003 defaults to the version sent back, not to the draft before it
    const v3Page = String((await supervisor().get(`/studios/${studio.slug}/versions/${v3}`)).body);
    expect(v3Page).toContain(`compare?a=${v1}&amp;b=${v3}`);
    expect(v3Page).not.toContain(`compare?a=${draft.body.version.id}&amp;b=${v3}`);

    expect((await supervisor().post(`/api/versions/${v3}/review/decide`, { decision: 'approved' })).status).toBe(200);
    const patch = await supervisor().patch(`/api/studios/${studio.id}/shots/${shotId}`, { plateWidth: 2048 });
    expect(patch.status, JSON.stringify(patch.body)).toBe(200);

    const res = await artist().get(`/api/studios/${studio.id}/shots/${shotId}/activity`);
    expect(res.status).toBe(200);
    const oldestFirst = [...res.body.activity].reverse();
    const steps = oldestFirst.map((e: any) => `${e.action}${e.versionNumber ? ` v${e.versionNumber}` : ''}`);
    expect(steps).toEqual([
      'shot.workflow',
      'version.create v1',
      'bake.done v1',
      'version.submit v1',
      'version.return v1',
      'version.create v2',
      'version.create v3',
      'bake.done v3',
      'version.submit v3',
      'version.approve v3',
      'shot.update',
    ]);
    const lines = oldestFirst.map(activityLine);
    const { artist: a, supervisor: s } = studio.members;
    expect(lines[0]).toBe(`${s.name} assigned the shot to ${a.name}`);
    expect(lines[1]).toBe(`${a.name} saved v001`);
    expect(lines[2]).toBe(`v001 baked (bake asked for by ${a.name})`);
    expect(lines[3]).toBe(`${a.name} submitted v001 for review: “first pass”`);
    expect(lines[4]).toBe(`${s.name} sent v001 back for changes: “crown too tall”`);
    expect(lines[9]).toBe(`${s.name} approved v003`);
    expect(lines[10]).toBe(`${s.name} changed the details: Plate width changed from 1920 to 2048 px`);
    // times never run backwards
    const times = oldestFirst.map((e: any) => Date.parse(e.createdAt));
    expect(times).toEqual([...times].sort((x, y) => x - y));
  }, 300_000);
});
