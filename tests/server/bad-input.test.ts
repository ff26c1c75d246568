// Bad input gets a clear 4xx JSON answer naming the field, and nothing is written.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { makeStudio, type TestStudio } from '../support/app';
import { db, closeDb } from '../../src/lib/server/db';
import { invitations } from '../../src/lib/server/db/schema';

let studio: TestStudio;
beforeAll(async () => {
  studio = await makeStudio();
});
afterAll(closeDb);

const invitationCount = async () =>
  Number((await db().select({ n: sql<number>`count(*)` }).from(invitations).where(eq(invitations.studioId, studio.id)))[0].n);

describe('bad input', () => {
  const url = () => `/api/studios/${studio.id}/invitations`;
  const owner = () => studio.members.owner.client;

  it('malformed JSON → 400 invalid_json', async () => {
    const res = await owner().request('POST', url(), undefined, '{"email": "a@b.example", ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_json');
    expect(await invitationCount()).toBe(0);
  });

  it('missing fields → 400 naming each field', async () => {
    const res = await owner().post(url(), {});
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'role']);
    expect(res.body.error.message).toContain('email');
  });

  it('wrong types → 400 naming the field', async () => {
    const res = await owner().post(url(), { email: 42, role: 'artist' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.email).toBeTruthy();
  });

  it('an unknown role → 400 listing the allowed roles', async () => {
    const res = await owner().post(url(), { email: 'someone@test.example', role: 'admin' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.role).toMatch(/owner, supervisor, artist, client/);
  });

  it('over-long strings → 400 naming the field', async () => {
    const res = await owner().post(url(), { email: `${'a'.repeat(300)}@test.example`, role: 'artist' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.email).toMatch(/too long/);
    const pw = await owner().post('/api/auth/password-reset/confirm', { token: 'x', password: 'p'.repeat(500) });
    expect(pw.status).toBe(400);
    expect(pw.body.error.fields.password).toMatch(/too long/);
  });

  it('a body over the size limit → 413', async () => {
    const res = await owner().request('POST', url(), undefined, JSON.stringify({ email: 'x@test.example', role: 'artist', pad: 'x'.repeat(1_100_000) }));
    expect(res.status).toBe(413);
  });

  it('a non-numeric id in the path → 404, never a 500', async () => {
    const res = await owner().get('/api/studios/abc/members');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('nothing was written by any refused request', async () => {
    expect(await invitationCount()).toBe(0);
  });
});

describe('actions that take no fields read and check their body', () => {
  const routes = ['/api/share-links/[linkId]/revoke', '/api/versions/[versionId]/bake/cancel', '/api/versions/[versionId]/exports/[assetId]/complete'];
  for (const route of routes) {
    it(`${route}: an unknown field → 400 naming it, a 2 KB body → 413, {} → not a 400`, async () => {
      const { ENDPOINTS } = await import('./endpoints');
      const e = ENDPOINTS.find((x) => x.route === route && x.method === 'POST')!;
      const who = studio.members[e.access as 'supervisor' | 'artist'].client;
      const path = await e.path(studio);
      const unknown = await who.post(path, { reason: 'x' });
      expect(unknown.status).toBe(400);
      expect(unknown.body.error.code).toBe('validation_failed');
      expect(Object.keys(unknown.body.error.fields)).toEqual(['reason']);
      const notObject = await who.request('POST', path, undefined, '[1,2]');
      expect(notObject.status).toBe(400);
      const big = await who.request('POST', path, undefined, JSON.stringify({ pad: 'x'.repeat(2048) }));
      expect(big.status).toBe(413);
      // The empty body the app's own buttons send still works.
      const ok = await who.post(path, {});
      expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    });
  }
});
