// Invitations and password resets by e-mail: the link arrives at the mail catcher, works once, and not after expiry.
import { describe, it, expect, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { Client, makeStudio, makeUser, waitForMail, linkIn, unique, APP } from '../support/app';
import { db, closeDb } from '../../src/lib/server/db';
import { invitations, memberships, users } from '../../src/lib/server/db/schema';

afterAll(closeDb);

const tokenOf = (link: string) => link.split('/').pop()!;

describe('invitations', () => {
  it('an owner invites by e-mail; the link creates the account once, then is refused', async () => {
    const studio = await makeStudio();
    const email = `${unique('new')}@test.example`;
    const res = await studio.members.owner.client.post(`/api/studios/${studio.id}/invitations`, { email, role: 'artist' });
    expect(res.status).toBe(201);
    const mail = await waitForMail(email);
    expect(mail.subject).toContain('invited you');
    expect(mail.html).toContain('<a href=');
    const link = linkIn(mail);
    expect(link.startsWith(`${APP}/invite/`)).toBe(true);
    const token = tokenOf(link);
    expect(token.length).toBeGreaterThanOrEqual(32); // 160 bits in base32

    const info = await new Client().get(`/api/invitations/${token}`);
    expect(info.status).toBe(200);
    expect(info.body).toMatchObject({ email, role: 'artist', accountExists: false });

    const newcomer = new Client();
    const accepted = await newcomer.post(`/api/invitations/${token}/accept`, { name: 'New Artist', password: 'a-long-enough-pw' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.studio).toBe(studio.slug);
    const me = await newcomer.get('/api/me');
    expect(me.body.studios).toEqual([expect.objectContaining({ id: studio.id, role: 'artist' })]);

    const again = await new Client().post(`/api/invitations/${token}/accept`, { name: 'Someone Else', password: 'another-long-pw' });
    expect(again.status).toBe(410);
    const [count] = await db().select().from(users).where(eq(users.email, email));
    expect(count.name).toBe('New Artist');
  });

  it('an expired invitation is refused', async () => {
    const studio = await makeStudio();
    const email = `${unique('late')}@test.example`;
    await studio.members.owner.client.post(`/api/studios/${studio.id}/invitations`, { email, role: 'client' });
    const token = tokenOf(linkIn(await waitForMail(email)));
    await db().update(invitations).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(invitations.email, email));
    const res = await new Client().post(`/api/invitations/${token}/accept`, { name: 'Late', password: 'a-long-enough-pw' });
    expect(res.status).toBe(410);
    expect(res.body.error.message).toMatch(/expired/);
    expect(await db().select().from(users).where(eq(users.email, email))).toHaveLength(0);
  });

  it('an existing account joins only when signed in as itself', async () => {
    const studio = await makeStudio();
    const person = await makeUser('Existing Person');
    await studio.members.owner.client.post(`/api/studios/${studio.id}/invitations`, { email: person.email, role: 'supervisor' });
    const token = tokenOf(linkIn(await waitForMail(person.email)));
    const stranger = await makeUser();
    const wrong = await (await new Client().signIn(stranger.email, stranger.password)).post(`/api/invitations/${token}/accept`, {});
    expect(wrong.status).toBe(403);
    const right = await (await new Client().signIn(person.email, person.password)).post(`/api/invitations/${token}/accept`, {});
    expect(right.status).toBe(200);
    const rows = await db().select().from(memberships).where(eq(memberships.userId, person.id));
    expect(rows.map((r) => [r.studioId, r.role])).toEqual([[studio.id, 'supervisor']]);
  });

  it('a withdrawn invitation is refused', async () => {
    const studio = await makeStudio();
    const email = `${unique('gone')}@test.example`;
    const created = await studio.members.owner.client.post(`/api/studios/${studio.id}/invitations`, { email, role: 'artist' });
    const token = tokenOf(linkIn(await waitForMail(email)));
    expect((await studio.members.owner.client.delete(`/api/studios/${studio.id}/invitations/${created.body.invitation.id}`)).status).toBe(204);
    expect((await new Client().get(`/api/invitations/${token}`)).status).toBe(410);
  });

  it('inviting someone already in the studio is a 409 naming the field', async () => {
    const studio = await makeStudio();
    const res = await studio.members.owner.client.post(`/api/studios/${studio.id}/invitations`, { email: studio.members.artist.email, role: 'artist' });
    expect(res.status).toBe(409);
    expect(res.body.error.fields).toHaveProperty('email');
  });
});

describe('members', () => {
  it('an owner changes a role and removes a member, but never the last owner', async () => {
    const studio = await makeStudio();
    const owner = studio.members.owner;
    const list = await owner.client.get(`/api/studios/${studio.id}/members`);
    expect(list.status).toBe(200);
    const byRole = Object.fromEntries(list.body.members.map((m: any) => [m.role, m]));
    expect(Object.keys(byRole).sort()).toEqual(['artist', 'client', 'owner', 'supervisor']);

    const promote = await owner.client.patch(`/api/studios/${studio.id}/members/${byRole.artist.id}`, { role: 'supervisor' });
    expect(promote.status).toBe(200);
    const demoteSelf = await owner.client.patch(`/api/studios/${studio.id}/members/${byRole.owner.id}`, { role: 'artist' });
    expect(demoteSelf.status).toBe(409);
    const removeSelf = await owner.client.delete(`/api/studios/${studio.id}/members/${byRole.owner.id}`);
    expect(removeSelf.status).toBe(409);
    expect((await owner.client.delete(`/api/studios/${studio.id}/members/${byRole.client.id}`)).status).toBe(204);
    const after = await owner.client.get(`/api/studios/${studio.id}/members`);
    expect(after.body.members.map((m: any) => m.role).sort()).toEqual(['owner', 'supervisor', 'supervisor']);
    // The removed client can no longer reach the studio.
    expect((await studio.members.client.client.get(`/api/studios/${studio.id}/members`)).status).toBe(404);
  });
});

describe('password reset', () => {
  it('e-mails a single-use link that sets a new password and signs out old sessions', async () => {
    const u = await makeUser();
    const old = await new Client().signIn(u.email, u.password);
    expect((await new Client().post('/api/auth/password-reset', { email: u.email })).status).toBe(202);
    const token = tokenOf(linkIn(await waitForMail(u.email, (m) => m.subject.includes('password'))));
    const done = await new Client().post('/api/auth/password-reset/confirm', { token, password: 'a-brand-new-password' });
    expect(done.status).toBe(200);
    expect((await old.get('/api/me')).status).toBe(401);
    expect((await new Client().post('/api/auth/sign-in', { email: u.email, password: u.password })).status).toBe(401);
    await new Client().signIn(u.email, 'a-brand-new-password');
    const reuse = await new Client().post('/api/auth/password-reset/confirm', { token, password: 'yet-another-password' });
    expect(reuse.status).toBe(410);
  });

  it('answers the same for an unknown address and sends nothing', async () => {
    const email = `${unique('ghost')}@test.example`;
    expect((await new Client().post('/api/auth/password-reset', { email })).status).toBe(202);
    await expect(waitForMail(email, () => true, 1500)).rejects.toThrow(/no e-mail/);
  });
});
