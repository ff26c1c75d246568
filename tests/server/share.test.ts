// Share links: made by a supervisor (token 160 bits, stored hashed), opened without an account, counted, refused
// clearly when expired, turned off, unknown or locked; the public side shows nothing else of the studio; a viewer's
// comment lands as a client note; the link can be e-mailed.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { randomBytes } from 'node:crypto';
import { Client, makeStudio, waitForMail, linkIn, type TestStudio } from '../support/app';
import { makeVersion, exportAsset, shareLink } from './endpoints';
import { closeDb, db } from '../../src/lib/server/db';
import { notes, shareLinks } from '../../src/lib/server/db/schema';
import { hashToken } from '../../src/lib/server/tokens';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);
const tokenOf = (url: string) => url.split('/share/')[1];
const randomToken = () => {
  const a = 'abcdefghijklmnopqrstuvwxyz234567';
  return Array.from(randomBytes(32), (b) => a[b & 31]).join('');
};

describe('share links', () => {
  it('a supervisor makes a link; only the hash is stored; the public API shows the slate facts and nothing else', async () => {
    const sup = studio.members.supervisor.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const made = await sup.post(`/api/versions/${versionId}/share-links`, { expiresAt: inDays(7) });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    const token = tokenOf(made.body.url);
    expect(token).toMatch(/^[a-z2-7]{32}$/); // 32 base32 characters = 160 bits
    const [row] = await db().select().from(shareLinks).where(eq(shareLinks.id, made.body.link.id));
    expect(row.tokenHash).toBe(hashToken(token));
    expect(JSON.stringify(row)).not.toContain(token);

    const anon = new Client();
    const open = await anon.get(`/api/shared/${token}`);
    expect(open.status).toBe(200);
    const s = open.body.share;
    // makeVersion's baked fixture is shared and submitted (a client never sees a draft; access.ts)
    expect(s).toMatchObject({ version: 'v001', studio: `Studio ${studio.slug}`, reviewState: 'submitted', media: { kind: 'version' } });
    expect(s.caution).toMatch(/licensed special-effects coordinator/);
    // Nothing else of the studio: no ids, no e-mails, no notes.
    const text = JSON.stringify(open.body);
    expect(text).not.toMatch(/"(id|versionId|studioId|shotId|authorId|exportAssetId)"/);
    expect(text).not.toContain('@');
    const media = await anon.get(`/api/shared/${token}/media`);
    expect(media.status).toBe(200);
    expect(media.body.kind).toBe('clip');
    expect(JSON.stringify(media.body)).not.toMatch(/"(id|versionId|studioId)"/);

    // every open is counted
    await anon.get(`/api/shared/${token}`);
    const page = await anon.get(`/share/${token}`);
    expect(page.status).toBe(200);
    expect(page.body).toContain('licensed special-effects coordinator');
    const links = await sup.get(`/api/versions/${versionId}/share-links`);
    expect(links.body.links[0].openCount).toBe(3);
    expect(links.body.links[0].status).toBe('active');
  });

  it('a viewer comment lands as a client note (guest name, not internal, at a frame)', async () => {
    const { token, versionId } = await shareLink(studio);
    const anon = new Client();
    const bad = await anon.post(`/api/shared/${token}/notes`, { name: '', body: 'x', frame: 1001 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('name');
    const outside = await anon.post(`/api/shared/${token}/notes`, { name: 'Dana', body: 'x', frame: 5 });
    expect(outside.status).toBe(400);
    expect(outside.body.error.fields).toHaveProperty('frame');
    const res = await anon.post(`/api/shared/${token}/notes`, { name: 'Dana (agency)', body: 'Bigger splash please', frame: 1004 });
    expect(res.status).toBe(201);
    const rows = await db().select().from(notes).where(eq(notes.versionId, versionId));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ guestName: 'Dana (agency)', internal: false, frame: 1004, body: 'Bigger splash please', authorId: null, studioId: studio.id });
    // The studio sees it as a guest's comment, never as one of its members.
    const list = await studio.members.supervisor.client.get(`/api/versions/${versionId}/notes`);
    expect(list.status).toBe(200);
    const shown = JSON.stringify(list.body);
    expect(shown).toContain('Dana (agency) (guest)');
    expect(shown).toContain('"guest":true');
  });

  it('expired → 410 and a clear page; turned off → 410 at once', async () => {
    const expired = await shareLink(studio, { expiresAt: new Date(Date.now() - 60_000) });
    const anon = new Client();
    const api = await anon.get(`/api/shared/${expired.token}`);
    expect(api.status).toBe(410);
    expect(api.body.error.message).toMatch(/expired/);
    const page = await anon.get(`/share/${expired.token}`);
    expect(page.status).toBe(410);
    expect(page.body).toContain('This link has closed');
    expect(page.body).toMatch(/expired on/);
    expect((await anon.post(`/api/shared/${expired.token}/notes`, { name: 'A', body: 'B', frame: 1001 })).status).toBe(410);

    const live = await shareLink(studio);
    expect((await anon.get(`/api/shared/${live.token}`)).status).toBe(200);
    const off = await studio.members.supervisor.client.post(`/api/share-links/${live.linkId}/revoke`);
    expect(off.status).toBe(200);
    expect(off.body.link.status).toBe('revoked');
    const after = await anon.get(`/api/shared/${live.token}`);
    expect(after.status).toBe(410);
    expect(after.body.error.message).toMatch(/turned this link off/);
    const page2 = await anon.get(`/share/${live.token}`);
    expect(page2.status).toBe(410);
    expect(page2.body).toContain('turned this link off');
    expect((await anon.get(`/api/shared/${live.token}/media`)).status).toBe(410);
  });

  it('a password link: 401 until unlocked, wrong password refused (API and page), the right one opens it', async () => {
    const sup = studio.members.supervisor.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const made = await sup.post(`/api/versions/${versionId}/share-links`, { expiresAt: inDays(3), password: 'tide-pool-42' });
    expect(made.status).toBe(201);
    expect(made.body.link.hasPassword).toBe(true);
    const token = tokenOf(made.body.url);
    const anon = new Client();
    const locked = await anon.get(`/api/shared/${token}`);
    expect(locked.status).toBe(401);
    expect(locked.body.error.passwordRequired).toBe(true);
    expect(JSON.stringify(locked.body)).not.toContain(studio.slug);
    expect((await anon.get(`/api/shared/${token}/media`)).status).toBe(401);
    const page = await anon.get(`/share/${token}`);
    expect(page.status).toBe(401);
    expect(page.body).toContain('This preview has a password');
    expect(page.body).not.toContain(studio.slug);
    const wrong = await anon.post(`/api/shared/${token}/unlock`, { password: 'nope-nope' });
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.fields).toHaveProperty('password');
    const wrongPage = await fetch(`${process.env.TEST_APP_URL}/share/${token}`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', origin: process.env.TEST_APP_URL! },
      body: 'password=nope-nope',
      redirect: 'manual',
    });
    expect(wrongPage.status).toBe(401);
    expect(await wrongPage.text()).toContain('That password is not right');
    const right = await anon.post(`/api/shared/${token}/unlock`, { password: 'tide-pool-42' });
    expect(right.status).toBe(200);
    expect((await anon.get(`/api/shared/${token}`)).status).toBe(200);
    expect((await anon.get(`/share/${token}`)).status).toBe(200);
    // another browser without the cookie is still refused
    expect((await new Client().get(`/api/shared/${token}`)).status).toBe(401);
  });

  it('cannot be enumerated: random and malformed tokens all get the same 404 answer', async () => {
    const anon = new Client();
    const answers = new Set<string>();
    for (const t of [randomToken(), randomToken(), randomToken(), 'short', 'A'.repeat(32), '../../etc', randomToken().slice(0, 31) + '1']) {
      const res = await anon.get(`/api/shared/${encodeURIComponent(t)}`);
      expect(res.status).toBe(404);
      answers.add(JSON.stringify(res.body));
      const media = await anon.get(`/api/shared/${encodeURIComponent(t)}/media`);
      expect(media.status).toBe(404);
      answers.add(JSON.stringify(media.body));
    }
    expect(answers.size).toBe(1);
    const page = await anon.get(`/share/${randomToken()}`);
    expect(page.status).toBe(404);
    expect(page.body).toContain('Nothing to show here');
  });

  it('links to an export play that file; only a ready export of the same version is accepted', async () => {
    const sup = studio.members.supervisor.client;
    const { versionId, assetId } = await exportAsset(studio, 'ready');
    const other = await exportAsset(studio, 'ready');
    const wrong = await sup.post(`/api/versions/${versionId}/share-links`, { expiresAt: inDays(2), exportAssetId: other.assetId });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields).toHaveProperty('exportAssetId');
    const made = await sup.post(`/api/versions/${versionId}/share-links`, { expiresAt: inDays(2), exportAssetId: assetId });
    expect(made.status).toBe(201);
    const token = tokenOf(made.body.url);
    const anon = new Client();
    expect((await anon.get(`/api/shared/${token}`)).body.share.media).toEqual({ kind: 'export', format: 'gif' });
    const media = await anon.get(`/api/shared/${token}/media`);
    expect(media.body.kind).toBe('export');
    const file = await fetch(media.body.url);
    expect(file.status).toBe(200);
  });

  it('bad input is refused naming the field, and nothing is made', async () => {
    const sup = studio.members.supervisor.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const cases: [unknown, string][] = [
      [{}, 'expiresAt'],
      [{ expiresAt: 'soon' }, 'expiresAt'],
      [{ expiresAt: '2001-01-01' }, 'expiresAt'],
      [{ expiresAt: inDays(800) }, 'expiresAt'],
      [{ expiresAt: inDays(3), password: '123' }, 'password'],
      [{ expiresAt: inDays(3), email: 'not-an-email' }, 'email'],
      [{ expiresAt: inDays(3), colour: 'red' }, '(body)'],
    ];
    for (const [body, field] of cases) {
      const res = await sup.post(`/api/versions/${versionId}/share-links`, body);
      expect(res.status, JSON.stringify(res.body)).toBe(400);
      expect(Object.keys(res.body.error.fields)).toContain(field);
    }
    expect((await sup.get(`/api/versions/${versionId}/share-links`)).body.links).toHaveLength(0);
    const unbaked = await makeVersion(studio);
    expect((await sup.post(`/api/versions/${unbaked.versionId}/share-links`, { expiresAt: inDays(3) })).status).toBe(409);
  });

  it('e-mails the link to a client, at creation and again with the token', async () => {
    const sup = studio.members.supervisor.client;
    const { versionId } = await makeVersion(studio, { baked: true });
    const to = `client-${randomBytes(4).toString('hex')}@agency.example`;
    const made = await sup.post(`/api/versions/${versionId}/share-links`, { expiresAt: inDays(5), email: to, message: 'First pass for Tuesday.' });
    expect(made.status).toBe(201);
    expect(made.body.emailedTo).toBe(to);
    const mail = await waitForMail(to);
    expect(linkIn(mail)).toBe(made.body.url);
    expect(mail.text).toContain('First pass for Tuesday.');
    expect(mail.text).toContain('licensed special-effects coordinator');
    const to2 = `second-${randomBytes(4).toString('hex')}@agency.example`;
    const wrongToken = await sup.post(`/api/share-links/${made.body.link.id}/send`, { token: randomToken(), email: to2 });
    expect(wrongToken.status).toBe(400);
    expect(wrongToken.body.error.fields).toHaveProperty('token');
    const again = await sup.post(`/api/share-links/${made.body.link.id}/send`, { token: made.body.token, email: to2 });
    expect(again.status).toBe(200);
    expect(linkIn(await waitForMail(to2))).toBe(made.body.url);
  });
});
