// The client's sign-off against the real app: never before the studio approved the version (409), only on what is
// shared with the client (404 otherwise), a repeated decision answers with the state already reached, guests decide
// through the share link, supervisors hear of the decision by e-mail, and the turnover can take the signed-off versions.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { Client, makeStudio, unique, waitForMail, type TestStudio } from '../support/app';
import { makeVersion, shareLink } from './endpoints';
import { QUAY_CUT, addMp4, fakeMp4 } from '../support/turnover';
import { closeDb, db } from '../../src/lib/server/db';
import { auditLog, shots, shows, versions } from '../../src/lib/server/db/schema';

let studio: TestStudio;
let other: TestStudio;
beforeAll(async () => {
  [studio, other] = await Promise.all([makeStudio(), makeStudio()]);
});
afterAll(closeDb);

const sup = () => studio.members.supervisor.client;
const client = () => studio.members.client.client;
const ask = (versionId: number, body: unknown = {}) => sup().post(`/api/versions/${versionId}/client-review`, body);
const decide = (c: Client, versionId: number, body: unknown) => c.post(`/api/versions/${versionId}/client-review/decide`, body);
const approve = async (versionId: number) => {
  const res = await sup().post(`/api/versions/${versionId}/review/decide`, { decision: 'approved' });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
};
const rowOf = async (versionId: number) => (await db().select().from(versions).where(eq(versions.id, versionId)))[0];

describe('client sign-off', () => {
  it('is refused with 409 before the studio approved the version, for the supervisor asking, the client and a guest', async () => {
    // makeVersion's baked fixture is shared with clients and submitted: the client sees it, nobody approved it yet
    const { versionId } = await makeVersion(studio, { baked: true });
    const asked = await ask(versionId);
    expect(asked.status).toBe(409);
    expect(asked.body.error).toMatchObject({ code: 'conflict', reviewState: 'submitted', clientState: 'not sent' });
    expect(asked.body.error.message).toMatch(/not approved by us yet/);

    const signed = await decide(client(), versionId, { decision: 'sign-off' });
    expect(signed.status).toBe(409);
    expect(signed.body.error).toMatchObject({ code: 'conflict', reviewState: 'submitted', clientState: 'not sent' });
    expect(signed.body.error.message).toMatch(/not approved by us yet/);

    const { token, versionId: linked } = await shareLink(studio);
    const guest = await new Client().post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'sign-off' });
    expect(guest.status).toBe(409);
    expect(guest.body.error.code).toBe('conflict');

    // nothing moved
    expect((await rowOf(versionId)).clientState).toBe('not sent');
    expect((await rowOf(linked)).clientState).toBe('not sent');
  });

  it('after approval: asked → waiting (and e-mailed to the show’s clients), signed off once, a repeat answers the same state', async () => {
    const { versionId } = await makeVersion(studio, { baked: true });
    await db().update(versions).set({ sharedWithClient: false }).where(eq(versions.id, versionId));
    await approve(versionId);
    // approved but not yet asked: the client cannot decide (and, unshared, cannot even see it)
    expect((await decide(client(), versionId, { decision: 'sign-off' })).status).toBe(404);

    const asked = await ask(versionId, { message: 'The crown is lower now.' });
    expect(asked.status, JSON.stringify(asked.body)).toBe(200);
    expect(asked.body).toMatchObject({ unchanged: false, version: { clientState: 'waiting' } });
    const row = await rowOf(versionId);
    expect(row.sharedWithClient).toBe(true);
    expect(row.reviewState).toBe('approved'); // the review state is untouched by the client side
    const mail = await waitForMail(studio.members.client.email, (m) => m.subject.startsWith('Your sign-off, please') && m.text.includes(`/versions/${versionId}`));
    expect(mail.text).toContain('The crown is lower now.');
    // asking again while waiting changes nothing
    expect((await ask(versionId)).body).toMatchObject({ unchanged: true, version: { clientState: 'waiting' } });

    // the client's inbox lists it as waiting for their sign-off
    const clientInbox = await client().get(`/api/studios/${studio.id}/inbox`);
    expect(clientInbox.body.client.map((i: any) => [i.versionId, i.clientState])).toContainEqual([versionId, 'waiting']);
    expect(clientInbox.body.counts.client).toBeGreaterThanOrEqual(1);

    const review = await client().get(`/api/versions/${versionId}/review`);
    expect(review.body.clientSteps).toEqual(['sign-off', 'ask-changes']);
    expect(review.body.version.clientState).toBe('waiting');

    const first = await decide(client(), versionId, { decision: 'sign-off' });
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    expect(first.body).toMatchObject({ unchanged: false, version: { clientState: 'signed off', clientDecidedByName: studio.members.client.name } });
    const again = await decide(client(), versionId, { decision: 'sign-off' });
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ unchanged: true, version: { clientState: 'signed off', clientDecidedAt: first.body.version.clientDecidedAt } });
    // a different decision after the first is a conflict, not a silent change
    const changed = await decide(client(), versionId, { decision: 'ask-changes', comment: 'Actually, lower still' });
    expect(changed.status).toBe(409);
    expect(changed.body.error).toMatchObject({ code: 'conflict', clientState: 'signed off' });

    // one audit entry per real step (the repeat wrote none)
    const entries = await db().select().from(auditLog).where(eq(auditLog.targetId, String(versionId)));
    expect(entries.filter((e) => e.action === 'version.client.sign-off')).toHaveLength(1);
    expect(entries.filter((e) => e.action === 'version.client.send')).toHaveLength(1);

    // the supervisors and owners are told
    for (const who of [studio.members.supervisor, studio.members.owner]) {
      await waitForMail(who.email, (m) => m.subject.startsWith('Client signed off') && m.text.includes(`/versions/${versionId}`));
    }
    // the supervisor's inbox lists the decision; it no longer waits in the client's
    const supInbox = await sup().get(`/api/studios/${studio.id}/inbox`);
    expect(supInbox.body.client.find((i: any) => i.versionId === versionId)).toMatchObject({ clientState: 'signed off', clientDecidedByName: studio.members.client.name });
    expect((await client().get(`/api/studios/${studio.id}/inbox`)).body.client.map((i: any) => i.versionId)).not.toContain(versionId);
    // the daily digest of a supervisor who opted in names the decision
    expect((await sup().patch('/api/me/preferences', { dailyDigest: true })).status).toBe(200);
    const { sendDigests } = await import('../../src/lib/server/notify');
    const digest = await sendDigests({ hours: 1 });
    expect(digest.sent.map((d) => d.email)).toContain(studio.members.supervisor.email);
    const day = await waitForMail(studio.members.supervisor.email, (m) => m.subject.includes('review day') && m.text.includes(`/versions/${versionId}`));
    expect(day.text).toMatch(/Client signed off/);
    // the studio sees both states on the version
    const seen = await sup().get(`/api/versions/${versionId}/review`);
    expect(seen.body.version).toMatchObject({ reviewState: 'approved', clientState: 'signed off' });
  });

  it('a client signs off only what is shared with them: unshared, another show, an archived shot, another studio → 404', async () => {
    const waiting = async (setup: (versionId: number, shotId: number) => Promise<void>) => {
      const made = await makeVersion(studio, { baked: true });
      await db().update(versions).set({ reviewState: 'approved', clientState: 'waiting' }).where(eq(versions.id, made.versionId));
      await setup(made.versionId, made.shotId);
      return made.versionId;
    };
    const unshared = await waiting((id) => db().update(versions).set({ sharedWithClient: false }).where(eq(versions.id, id)).then(() => undefined));
    const otherShow = await waiting(async (_id, shotId) => {
      // a show the client's membership does not name (client_shows)
      const [res] = await db().insert(shows).values({ studioId: studio.id, code: unique('NS').slice(0, 30), name: 'Not for this client' });
      await db().update(shots).set({ showId: Number(res.insertId) }).where(eq(shots.id, shotId));
    });
    const archived = await waiting((_id, shotId) => db().update(shots).set({ archivedAt: new Date() }).where(eq(shots.id, shotId)).then(() => undefined));
    for (const versionId of [unshared, otherShow, archived]) {
      const res = await decide(client(), versionId, { decision: 'sign-off' });
      expect(res.status, `version ${versionId}`).toBe(404);
      expect((await rowOf(versionId)).clientState).toBe('waiting');
    }
    // a shared, waiting version: another studio's client gets 404, the studio's own people 403, the client 200
    const open = await waiting(async () => undefined);
    expect((await decide(other.members.client.client, open, { decision: 'sign-off' })).status).toBe(404);
    for (const role of ['owner', 'supervisor', 'artist'] as const) {
      const res = await decide(studio.members[role].client, open, { decision: 'sign-off' });
      expect(res.status, role).toBe(403);
    }
    expect((await decide(client(), open, { decision: 'sign-off' })).status).toBe(200);
  });

  it('bad input names the field; asking for changes needs a comment', async () => {
    const made = await makeVersion(studio, { baked: true });
    await db().update(versions).set({ reviewState: 'approved', clientState: 'waiting' }).where(eq(versions.id, made.versionId));
    const wrong = await decide(client(), made.versionId, { decision: 'approve' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields).toHaveProperty('decision');
    const extra = await decide(client(), made.versionId, { decision: 'sign-off', stamp: true });
    expect(extra.status).toBe(400);
    const bare = await decide(client(), made.versionId, { decision: 'ask-changes' });
    expect(bare.status).toBe(400);
    expect(bare.body.error.fields).toHaveProperty('comment');
    expect((await ask(made.versionId, { message: 42 })).body.error.fields).toHaveProperty('message');
  });

  it('a guest with the share link asks for changes: stored with their name and comment, told to the studio', async () => {
    const { token, versionId } = await shareLink(studio);
    await db().update(versions).set({ reviewState: 'approved' }).where(eq(versions.id, versionId));
    const guest = new Client();
    // not asked yet
    expect((await guest.post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'sign-off' })).status).toBe(409);
    expect((await ask(versionId)).status).toBe(200);
    const info = await guest.get(`/api/shared/${token}`);
    expect(info.body.share).toMatchObject({ clientState: 'waiting', clientSteps: ['sign-off', 'ask-changes'] });

    const noName = await guest.post(`/api/shared/${token}/decision`, { name: ' ', decision: 'sign-off' });
    expect(noName.status).toBe(400);
    expect(noName.body.error.fields).toHaveProperty('name');
    const noComment = await guest.post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'ask-changes' });
    expect(noComment.body.error.fields).toHaveProperty('comment');

    const res = await guest.post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'ask-changes', comment: 'Less spray on the left' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.version).toMatchObject({ clientState: 'changes asked', clientDecidedByName: 'Ines Varga', clientComment: 'Less spray on the left' });
    const repeat = await guest.post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'ask-changes', comment: 'Less spray on the left' });
    expect(repeat.body).toMatchObject({ unchanged: true, version: { clientState: 'changes asked' } });
    const row = await rowOf(versionId);
    expect(row.clientDecidedBy).toBeNull();
    await waitForMail(studio.members.supervisor.email, (m) => m.subject.startsWith('Client asked for changes') && m.text.includes('Less spray on the left'));
    // a revoked link decides nothing
    const revoked = await shareLink(studio, { revoked: true });
    expect((await guest.post(`/api/shared/${revoked.token}/decision`, { name: 'Ines Varga', decision: 'sign-off' })).status).toBe(410);
  });
});

describe('turnover of the versions the client signed off', () => {
  it('approval=client takes only the signed-off versions; approval=internal takes every approved one', async () => {
    const api = `/api/studios/${studio.id}`;
    const show = await sup().post(`${api}/shows`, { code: unique('CA').slice(0, 14), name: 'Quay', frameRate: '24' });
    expect(show.status, JSON.stringify(show.body)).toBe(201);
    const showId = show.body.show.id as number;
    const imported = await sup().post(`${api}/shows/${showId}/import/confirm`, { format: 'edl', text: QUAY_CUT, options: { codeFrom: 'clip', headHandles: 8 } });
    expect(imported.status, JSON.stringify(imported.body)).toBe(200);
    const [a, b] = await db().select().from(shots).where(eq(shots.showId, showId)).orderBy(shots.recordIn);
    const ids: number[] = [];
    for (const [shot, clientState] of [[a, 'signed off'], [b, 'waiting']] as const) {
      const [v] = await db().insert(versions).values({ studioId: studio.id, shotId: shot.id, number: 1, scene: {}, sceneHash: unique('h'), reviewState: 'approved', bakeState: 'baked', clientState });
      ids.push(Number(v.insertId));
      await addMp4(studio, Number(v.insertId), shot.id, `${shot.code}_v001.mp4`, fakeMp4(shot.code));
    }
    const internal = await sup().get(`${api}/shows/${showId}/turnover?approval=internal`);
    expect(internal.body.turnover.items.map((i: any) => i.versionId)).toEqual(ids);
    const signed = await sup().get(`${api}/shows/${showId}/turnover?approval=client`);
    expect(signed.status, JSON.stringify(signed.body)).toBe(200);
    expect(signed.body.turnover.approval).toBe('client');
    expect(signed.body.turnover.items.map((i: any) => [i.code, i.versionId, i.recordIn])).toEqual([[a.code, ids[0], '01:00:00:00']]);
    expect(signed.body.turnover.notApproved).toBe(2); // b waits for the client, the third shot has no version
    const bad = await sup().get(`${api}/shows/${showId}/turnover?approval=clients`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('approval');
  });
});
