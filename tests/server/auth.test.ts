// Sign-in, throttling, sign-out and session expiry against the running app and the real MariaDB.
import { describe, it, expect, afterAll } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { Client, makeUser } from '../support/app';
import { db, closeDb } from '../../src/lib/server/db';
import { sessions, throttleHits } from '../../src/lib/server/db/schema';
import { RULES, keyHash } from '../../src/lib/server/throttle';

afterAll(closeDb);

describe('sign-in', () => {
  it('accepts the right password and sets an HttpOnly, SameSite=Lax session cookie', async () => {
    const u = await makeUser();
    const c = new Client();
    const res = await c.request('POST', '/api/auth/sign-in', { email: u.email.toUpperCase(), password: u.password });
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe(u.email);
    const cookie = res.headers.getSetCookie().find((s) => s.startsWith('tidemark_session='));
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    const me = await c.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.user.id).toBe(u.id);
  });

  it('refuses a wrong password with 401 naming the field, and sets no cookie', async () => {
    const u = await makeUser();
    const c = new Client();
    const res = await c.post('/api/auth/sign-in', { email: u.email, password: 'not-the-password' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
    expect(res.body.error.fields).toHaveProperty('password');
    expect(c.cookies.size).toBe(0);
    expect((await c.get('/api/me')).status).toBe(401);
  });

  it('refuses an unknown account the same way as a wrong password', async () => {
    const res = await new Client().post('/api/auth/sign-in', { email: 'nobody@test.example', password: 'whatever-it-is' });
    expect(res.status).toBe(401);
    expect(res.body.error.message).toBe('Wrong e-mail or password');
  });

  it(`after ${RULES.signInAccount.limit} failures from any addresses an account waits (429), then the right password works`, async () => {
    const u = await makeUser();
    for (let i = 0; i < RULES.signInAccount.limit; i++) {
      const res = await new Client().post('/api/auth/sign-in', { email: u.email, password: `wrong-${i}-password` });
      expect(res.status).toBe(401);
    }
    const blocked = await new Client().post('/api/auth/sign-in', { email: u.email, password: u.password });
    expect(blocked.status).toBe(429);
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0);
    expect(blocked.body.error.message).toMatch(/Too many failed sign-ins/);
    // The delay is a delay, not a lock: once it has passed, the right password signs in.
    await db()
      .update(throttleHits)
      .set({ createdAt: sql`${throttleHits.createdAt} - INTERVAL ${Math.ceil(RULES.signInAccount.firstDelayMs / 1000) + 1} SECOND` })
      .where(and(eq(throttleHits.bucket, RULES.signInAccount.bucket), eq(throttleHits.keyHash, keyHash(u.email))));
    const after = await new Client().post('/api/auth/sign-in', { email: u.email, password: u.password });
    expect(after.status).toBe(200);
  });

  it('signs out: the session stops working and the cookie is cleared', async () => {
    const u = await makeUser();
    const c = await new Client().signIn(u.email, u.password);
    const saved = new Map(c.cookies);
    expect((await c.post('/api/auth/sign-out')).status).toBe(204);
    expect(c.cookies.has('tidemark_session')).toBe(false);
    expect((await c.get('/api/me')).status).toBe(401);
    // The old cookie replayed is dead too.
    const replay = new Client();
    replay.cookies = saved;
    expect((await replay.get('/api/me')).status).toBe(401);
  });

  it('an expired session is refused', async () => {
    const u = await makeUser();
    const c = await new Client().signIn(u.email, u.password);
    expect((await c.get('/api/me')).status).toBe(200);
    await db().update(sessions).set({ expiresAt: new Date(Date.now() - 60_000) }).where(eq(sessions.userId, u.id));
    expect((await c.get('/api/me')).status).toBe(401);
  });

  it('refuses a cross-site form post (origin check), so a signed-in user cannot be made to act elsewhere', async () => {
    const u = await makeUser();
    const c = await new Client().signIn(u.email, u.password);
    const res = await fetch(`${process.env.TEST_APP_URL}/api/auth/sign-out`, {
      method: 'POST',
      headers: { cookie: [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; '), origin: 'https://elsewhere.example', 'content-type': 'application/x-www-form-urlencoded' },
      body: 'x=1',
    });
    expect(res.status).toBe(403);
    expect((await c.get('/api/me')).status).toBe(200);
  });

  it('pages redirect a signed-out visitor to sign-in', async () => {
    const res = await new Client().request('GET', '/studios/saltmarsh/');
    expect(res.status).toBe(302);
    expect(res.headers.get('location')).toMatch(/^\/sign-in\?next=/);
  });
});
