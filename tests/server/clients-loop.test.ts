// Clients in the review loop, against the real app and mail catcher: a share link e-mailed to a client account's
// address appears in that account (and in one made later with the address); client comments reach the version's
// artist and the supervisors by e-mail in batches (one mail per version per window, from an outbox in the database);
// a guest who signs off gets a confirmation; a repeated decision by the same supervisor answers with the state
// reached; a re-export gets a numbered name or replaces the earlier one.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { APP, Client, MAIL, makeStudio, makeUser, type CaughtMail, type TestStudio, waitForMail } from '../support/app';
import { makeVersion } from './endpoints';
import { postUploadForm } from '../support/plates';
import { closeDb, db } from '../../src/lib/server/db';
import { assets, memberships, notes, reviewEvents, shareLinks, shots, users, versions } from '../../src/lib/server/db/schema';
import { CLIENT_NOTE_MAIL_WINDOW_MS, sendClientNoteMails } from '../../src/lib/server/client-notes';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const sup = () => studio.members.supervisor;
const inAWeek = () => new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10);

async function mailsTo(address: string, match: (m: CaughtMail) => boolean): Promise<CaughtMail[]> {
  const res = await fetch(`${MAIL}/api/email?to.address=${encodeURIComponent(address)}`);
  return ((await res.json()) as CaughtMail[]).filter(match);
}
const pause = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A baked version authored by the studio's artist, not shared with clients, not in any client's show. */
async function artistsVersion() {
  const { versionId, shotId } = await makeVersion(studio, { baked: true });
  await db().update(versions).set({ authorId: studio.members.artist.id, sharedWithClient: false }).where(eq(versions.id, versionId));
  return { versionId, shotId };
}

describe('share links reach client accounts', () => {
  it('a link e-mailed to the client’s address shows its version in the account; an account made later picks it up; revoking hides it', async () => {
    const { versionId } = await artistsVersion();
    const client = studio.members.client;
    // not shared with clients, not in the client's shows: hidden
    expect((await client.client.get(`/api/versions/${versionId}`)).status).toBe(404);
    const later = `later-${Date.now()}@test.example`;
    const made = await sup().client.post(`/api/versions/${versionId}/share-links`, { expiresAt: inAWeek(), email: client.email.toUpperCase() });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    const linkId = made.body.link.id;
    expect((await sup().client.post(`/api/share-links/${linkId}/send`, { token: made.body.token, email: later })).status).toBe(200);

    // the client account with that address sees the version, and its home lists it to watch
    expect((await client.client.get(`/api/versions/${versionId}`)).status).toBe(200);
    const home = await client.client.get(`/studios/${studio.slug}`);
    expect(home.status).toBe(200);
    expect(home.body).toContain('data-testid="client-waiting"');
    expect(home.body).toContain('Waiting for you');
    expect(home.body).toContain(`/studios/${studio.slug}/versions/${versionId}`);
    expect(home.body).not.toContain('Nothing shared with you yet');

    // an account made afterwards with the second address, given a client membership, finds it too
    const u = await makeUser('Later Client');
    await db().update(users).set({ email: later }).where(eq(users.id, u.id));
    await db().insert(memberships).values({ studioId: studio.id, userId: u.id, role: 'client' });
    const laterClient = await new Client().signIn(later, u.password);
    expect((await laterClient.get(`/api/versions/${versionId}`)).status).toBe(200);

    // a client of the studio the link was not sent to still does not see it
    const stranger = await makeUser('Other Client');
    await db().insert(memberships).values({ studioId: studio.id, userId: stranger.id, role: 'client' });
    const strangerClient = await new Client().signIn(stranger.email, stranger.password);
    expect((await strangerClient.get(`/api/versions/${versionId}`)).status).toBe(404);

    // the link turned off: the version is no longer in the accounts
    expect((await sup().client.post(`/api/share-links/${linkId}/revoke`)).status).toBe(200);
    expect((await client.client.get(`/api/versions/${versionId}`)).status).toBe(404);
    expect((await laterClient.get(`/api/versions/${versionId}`)).status).toBe(404);
  });
});

describe('client comments by e-mail', () => {
  it('the artist and the supervisor get one mail per version per window, marked share link or client account; held comments go out from the outbox', async () => {
    const { versionId, shotId } = await artistsVersion();
    const made = await sup().client.post(`/api/versions/${versionId}/share-links`, { expiresAt: inAWeek(), email: studio.members.client.email });
    expect(made.status).toBe(201);
    const token = made.body.token as string;
    const [shot] = await db().select({ firstFrame: shots.firstFrame }).from(shots).where(eq(shots.id, shotId));
    const frame = shot.firstFrame;

    const guest = new Client();
    const ofVersion = (m: CaughtMail) => m.subject.startsWith('Client comment') && m.text.includes(`/versions/${versionId}`);
    const first = await guest.post(`/api/shared/${token}/notes`, { name: 'Robin Ashgrove', body: 'The splash could reach the railing.', frame });
    expect(first.status, JSON.stringify(first.body)).toBe(201);
    const artistMail = await waitForMail(studio.members.artist.email, ofVersion);
    const supMail = await waitForMail(sup().email, ofVersion);
    for (const m of [artistMail, supMail]) {
      expect(m.text).toContain('The splash could reach the railing.');
      expect(m.text).toContain('Robin Ashgrove, via the share link');
    }

    // within the window: two more comments (one from the client account), no more mail
    const second = await studio.members.client.client.post(`/api/versions/${versionId}/notes`, { body: 'And a little less foam, please.', frame });
    expect(second.status, JSON.stringify(second.body)).toBe(201);
    expect((await guest.post(`/api/shared/${token}/notes`, { name: 'Robin Ashgrove', body: 'Ignore the railing, it moves.', frame })).status).toBe(201);
    await pause(1500);
    expect(await mailsTo(studio.members.artist.email, ofVersion)).toHaveLength(1);
    expect(await mailsTo(sup().email, ofVersion)).toHaveLength(1);
    // …they wait in the outbox in the database
    const waiting = (await db().select().from(notes).where(eq(notes.versionId, versionId))).filter((n) => n.mailedAt === null);
    expect(waiting.map((n) => n.clientSource).sort()).toEqual(['client account', 'share link']);

    // a sweep inside the window sends nothing; a sweep after it (run from this process, not the server that queued
    // them: the outbox is not held in memory) sends one mail with both
    expect(await sendClientNoteMails({ versionId })).toEqual([]);
    const [row] = await db().select().from(versions).where(eq(versions.id, versionId));
    expect(await sendClientNoteMails({ versionId, now: new Date(row.clientNotesMailedAt!.getTime() + CLIENT_NOTE_MAIL_WINDOW_MS + 1000) })).toEqual([versionId]);
    for (const to of [studio.members.artist.email, sup().email]) {
      const batch = await waitForMail(to, (m) => ofVersion(m) && m.subject.includes('(2)'));
      expect(batch.text).toContain(`${studio.members.client.name}, from their client account: And a little less foam, please.`);
      expect(batch.text).toContain('Robin Ashgrove, via the share link: Ignore the railing, it moves.');
      expect(batch.text).not.toContain('could reach the railing'); // sent before, not again
      expect(await mailsTo(to, ofVersion)).toHaveLength(2);
    }
    // nothing left in the outbox; another sweep sends nothing
    expect((await db().select().from(notes).where(eq(notes.versionId, versionId))).every((n) => n.mailedAt !== null)).toBe(true);
    expect(await sendClientNoteMails({ versionId, now: new Date(Date.now() + 2 * CLIENT_NOTE_MAIL_WINDOW_MS) })).toEqual([]);
    // the client who commented gets none of these
    expect(await mailsTo(studio.members.client.email, ofVersion)).toHaveLength(0);
  });
});

describe('sign-off confirmation', () => {
  it('a guest who signs off through the share link and gives an address is sent a confirmation; a repeat sends none', async () => {
    const { versionId } = await artistsVersion();
    await db().update(versions).set({ reviewState: 'approved' }).where(eq(versions.id, versionId));
    expect((await sup().client.post(`/api/versions/${versionId}/client-review`, {})).status).toBe(200);
    const made = await sup().client.post(`/api/versions/${versionId}/share-links`, { expiresAt: inAWeek() });
    const token = made.body.token as string;
    const guest = new Client();
    const address = `guest-${Date.now()}@test.example`;
    const bad = await guest.post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'sign-off', email: 'not-an-address' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('email');
    const signed = await guest.post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'sign-off', email: address });
    expect(signed.status, JSON.stringify(signed.body)).toBe(200);
    expect(signed.body).toMatchObject({ unchanged: false, confirmationTo: address, version: { clientState: 'signed off' } });
    const mail = await waitForMail(address, (m) => m.subject.startsWith('You signed off'));
    expect(mail.text).toContain('This confirms that you signed off');
    expect(mail.text).toContain(`${APP}/share/${token}`);
    const again = await guest.post(`/api/shared/${token}/decision`, { name: 'Ines Varga', decision: 'sign-off', email: address });
    expect(again.body).toMatchObject({ unchanged: true, version: { clientState: 'signed off' } });
    await pause(1000);
    expect(await mailsTo(address, () => true)).toHaveLength(1);
  });
});

describe('decisions that cannot double-fire', () => {
  it('the same supervisor approving twice gets 200 and the state reached, one review event, one mail; another supervisor gets 409', async () => {
    const { versionId } = await artistsVersion();
    await db().update(versions).set({ reviewState: 'submitted' }).where(eq(versions.id, versionId));
    const [a, b] = await Promise.all([
      sup().client.post(`/api/versions/${versionId}/review/decide`, { decision: 'approved' }),
      sup().client.post(`/api/versions/${versionId}/review/decide`, { decision: 'approved' }),
    ]);
    expect([a.status, b.status]).toEqual([200, 200]);
    expect([a.body.version.reviewState, b.body.version.reviewState]).toEqual(['approved', 'approved']);
    expect([a.body.unchanged, b.body.unchanged].sort()).toEqual([false, true]);
    expect(a.body.event.id).toBe(b.body.event.id);
    const events = (await db().select().from(reviewEvents).where(eq(reviewEvents.versionId, versionId))).filter((e) => e.toState === 'approved');
    expect(events).toHaveLength(1);
    await waitForMail(studio.members.artist.email, (m) => m.subject.startsWith('Approved') && m.text.includes(`/versions/${versionId}`));
    await pause(1000);
    expect(await mailsTo(studio.members.artist.email, (m) => m.subject.startsWith('Approved') && m.text.includes(`/versions/${versionId}`))).toHaveLength(1);
    // returning what the same person approved is still a conflict (a different decision), and so is another supervisor's
    expect((await sup().client.post(`/api/versions/${versionId}/review/decide`, { decision: 'returned', comment: 'no' })).status).toBe(409);
    expect((await studio.members.owner.client.post(`/api/versions/${versionId}/review/decide`, { decision: 'approved' })).status).toBe(409);
  });
});

describe('re-exports', () => {
  const GIF = new Uint8Array([0x47, 0x49, 0x46, 0x38, 0x39, 0x61, 2, 0, 2, 0, 0, 0, 0, 0x2c, 0, 0x3b]);
  const options = { first: 1001, last: 1010, width: 320, height: 180, look: 'surface', slate: true, slateSeconds: 1, burnIns: true, plate: false, loop: true };
  async function exportOnce(versionId: number, sameName?: 'number' | 'replace') {
    const artist = studio.members.artist.client;
    const start = await artist.post(`/api/versions/${versionId}/exports`, { format: 'gif', byteSize: GIF.length, fileName: 'RE_010_v001_1001-1010.gif', options, ...(sameName ? { sameName } : {}) });
    expect(start.status, JSON.stringify(start.body)).toBe(201);
    expect((await postUploadForm(start.body.upload, GIF, 'image/gif')).status).toBe(204);
    const done = await artist.post(`/api/versions/${versionId}/exports/${start.body.assetId}/complete`);
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    return done.body.export as { id: number; fileName: string };
  }
  it('a second export under the same name is numbered, or replaces the earlier one (share links follow it); bad choice → 400', async () => {
    const { versionId } = await makeVersion(studio, { baked: true });
    const one = await exportOnce(versionId);
    expect(one.fileName).toBe('RE_010_v001_1001-1010.gif');
    expect((await exportOnce(versionId)).fileName).toBe('RE_010_v001_1001-1010-2.gif');
    expect((await exportOnce(versionId, 'number')).fileName).toBe('RE_010_v001_1001-1010-3.gif');
    const link = await sup().client.post(`/api/versions/${versionId}/share-links`, { expiresAt: inAWeek(), exportAssetId: one.id });
    expect(link.status, JSON.stringify(link.body)).toBe(201);
    const replacing = await exportOnce(versionId, 'replace');
    expect(replacing.fileName).toBe('RE_010_v001_1001-1010.gif');
    const listed = (await studio.members.artist.client.get(`/api/versions/${versionId}/exports`)).body.exports.map((e: { fileName: string }) => e.fileName).sort();
    expect(listed).toEqual(['RE_010_v001_1001-1010-2.gif', 'RE_010_v001_1001-1010-3.gif', 'RE_010_v001_1001-1010.gif']);
    expect((await db().select().from(assets).where(eq(assets.id, one.id))).length).toBe(0);
    const [l] = await db().select().from(shareLinks).where(eq(shareLinks.id, link.body.link.id));
    expect(l.exportAssetId).toBe(replacing.id);
    const bad = await studio.members.artist.client.post(`/api/versions/${versionId}/exports`, { format: 'gif', byteSize: 16, fileName: 'x.gif', options, sameName: 'overwrite' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('sameName');
    const badHold = await studio.members.artist.client.post(`/api/versions/${versionId}/exports`, { format: 'gif', byteSize: 16, fileName: 'x.gif', options: { ...options, slateSeconds: 60 } });
    expect(badHold.status).toBe(400);
    expect(Object.keys(badHold.body.error.fields).join()).toContain('slateSeconds');
  });
});
