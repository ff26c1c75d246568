// Throttles in the database: parallel guesses are counted one after another, the count is shared by app servers and
// survives a restart, the address is the trusted proxy's hop (never a header from anyone), and a password reset
// answers the same for known and unknown e-mails, sends at most a few mails, and voids older links.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq } from 'drizzle-orm';
import { APP, MAIL, Client, makeStudio, makeUser, unique, waitForMail, linkIn, type TestStudio } from '../support/app';
import { startSecondApp, type SecondApp } from '../support/second-app';
import { shareLink } from './endpoints';
import { db, closeDb } from '../../src/lib/server/db';
import { shareLinks } from '../../src/lib/server/db/schema';
import { hashPassword } from '../../src/lib/server/password';
import { RULES } from '../../src/lib/server/throttle';
import { freePort } from '../../src/cli/services';

afterAll(closeDb);

const post = (base: string, path: string, body: unknown, forwardedFor: string) =>
  fetch(base + path, {
    method: 'POST',
    headers: { origin: base, 'content-type': 'application/json', 'x-forwarded-for': forwardedFor },
    body: JSON.stringify(body),
  }).then(async (r) => ({ status: r.status, text: await r.text(), headers: r.headers }));

const tally = (statuses: number[]) => statuses.reduce<Record<number, number>>((t, s) => ((t[s] = (t[s] ?? 0) + 1), t), {});

describe('sign-in throttle', () => {
  it(`40 parallel wrong sign-ins for one account from 40 addresses → at most ${RULES.signInAccount.limit} × 401, the rest 429`, async () => {
    const u = await makeUser();
    const answers = await Promise.all(
      Array.from({ length: 40 }, (_, i) => post(APP, '/api/auth/sign-in', { email: u.email, password: `wrong-${i}` }, `198.51.100.${i + 1}`)),
    );
    const t = tally(answers.map((a) => a.status));
    console.log('40 parallel wrong sign-ins:', t);
    expect(t[401] ?? 0).toBeGreaterThanOrEqual(1);
    expect(t[401] ?? 0).toBeLessThanOrEqual(RULES.signInAccount.limit);
    expect((t[401] ?? 0) + (t[429] ?? 0)).toBe(40);
  });

  it('from a peer that is not a trusted proxy, X-Forwarded-For is ignored: forged addresses share one count', async () => {
    const app = await startSecondApp({ TRUSTED_PROXIES: '' });
    try {
      const limit = RULES.signInAddress.limit;
      const statuses: number[] = [];
      // Different accounts (so the per-account rule never trips), a different forged address each time.
      for (let i = 0; i <= limit; i++) {
        statuses.push((await post(app.url, '/api/auth/sign-in', { email: `${unique('nobody')}@test.example`, password: 'wrong-password' }, `203.0.113.${i + 1}`)).status);
      }
      expect(statuses.slice(0, limit).every((s) => s === 401)).toBe(true);
      expect(statuses[limit]).toBe(429);
    } finally {
      await app.stop();
    }
  });
});

describe('share-link password throttle', () => {
  let studio: TestStudio;
  let second: SecondApp;
  beforeAll(async () => {
    studio = await makeStudio();
    second = await startSecondApp({}, { port: await freePort() });
  });
  afterAll(async () => {
    await second?.stop();
  });

  it(`50 parallel wrong passwords across two app servers → at most ${RULES.sharePasswordLink.limit} × 401; the count survives a restart`, async () => {
    const { token, linkId } = await shareLink(studio);
    await db().update(shareLinks).set({ passwordHash: await hashPassword('tide-pool-42') }).where(eq(shareLinks.id, linkId));
    const answers = await Promise.all(
      Array.from({ length: 50 }, (_, i) => post(i % 2 ? second.url : APP, `/api/shared/${token}/unlock`, { password: `wrong-${i}` }, `192.0.2.${i + 1}`)),
    );
    const t = tally(answers.map((a) => a.status));
    console.log('50 parallel wrong share passwords on two servers:', t);
    expect(t[401] ?? 0).toBeGreaterThanOrEqual(1);
    expect(t[401] ?? 0).toBeLessThanOrEqual(RULES.sharePasswordLink.limit);
    expect((t[401] ?? 0) + (t[429] ?? 0)).toBe(50);

    // Restart the second server: the count is in the database, so the link still waits (even for the right password).
    const port = Number(new URL(second.url).port);
    await second.stop();
    second = await startSecondApp({}, { port });
    const after = await post(second.url, `/api/shared/${token}/unlock`, { password: 'tide-pool-42' }, '192.0.2.200');
    expect(after.status).toBe(429);
    expect(Number(after.headers.get('retry-after'))).toBeGreaterThan(0);
  });
});

describe('password reset', () => {
  const mailsTo = async (address: string) => {
    const res = await fetch(`${MAIL}/api/email?to.address=${encodeURIComponent(address)}`);
    return ((await res.json()) as unknown[]).length;
  };

  it('10 requests for one account send at most 3 mails; known and unknown e-mails get identical answers', async () => {
    const u = await makeUser();
    const unknown = `${unique('nobody')}@test.example`;
    const known: string[] = [];
    const stranger: string[] = [];
    for (let i = 0; i < 10; i++) {
      const a = await post(APP, '/api/auth/password-reset', { email: u.email }, `198.18.0.${i + 1}`);
      const b = await post(APP, '/api/auth/password-reset', { email: unknown }, `198.18.1.${i + 1}`);
      known.push(`${a.status} ${a.text}`);
      stranger.push(`${b.status} ${b.text}`);
    }
    expect(new Set([...known, ...stranger]).size).toBe(1);
    expect(known[0]).toMatch(/^202 /);
    await waitForMail(u.email);
    await new Promise((r) => setTimeout(r, 1500)); // let any later mail arrive
    const n = await mailsTo(u.email);
    console.log(`10 reset requests → ${n} mails`);
    expect(n).toBeGreaterThanOrEqual(1);
    expect(n).toBeLessThanOrEqual(RULES.resetEmail.limit);
  });

  it('a new reset link voids the older one', async () => {
    const u = await makeUser();
    const ip = '198.18.2.1';
    await post(APP, '/api/auth/password-reset', { email: u.email }, ip);
    const first = linkIn(await waitForMail(u.email));
    await post(APP, '/api/auth/password-reset', { email: u.email }, ip);
    const second = linkIn(await waitForMail(u.email, (m) => !m.text.includes(first)));
    expect(second).not.toBe(first);
    const tokenOf = (l: string) => l.split('/reset-password/')[1];
    const old = await new Client().post('/api/auth/password-reset/confirm', { token: tokenOf(first), password: 'a-brand-new-password' });
    expect(old.status).toBe(410);
    const fresh = await new Client().post('/api/auth/password-reset/confirm', { token: tokenOf(second), password: 'a-brand-new-password' });
    expect(fresh.status).toBe(200);
  });

  it('while SMTP is down, known and unknown e-mails still get the identical answer', async () => {
    const app = await startSecondApp({ SMTP_PORT: String(await freePort()) });
    try {
      const u = await makeUser();
      const times: Record<string, number[]> = { known: [], unknown: [] };
      const answers = new Set<string>();
      for (let i = 0; i < 3; i++) {
        for (const [kind, email] of [['known', u.email], ['unknown', `${unique('nobody')}@test.example`]] as const) {
          const t0 = performance.now();
          const a = await post(app.url, '/api/auth/password-reset', { email }, `198.18.3.${i * 2 + (kind === 'known' ? 1 : 2)}`);
          times[kind].push(performance.now() - t0);
          answers.add(`${a.status} ${a.text}`);
        }
      }
      console.log('reset answer times with SMTP down (ms):', JSON.stringify(times, (_, v) => (typeof v === 'number' ? Math.round(v) : v)));
      expect([...answers]).toHaveLength(1);
      expect([...answers][0]).toMatch(/^202 /);
    } finally {
      await app.stop();
    }
  });
});

describe('guest notes', () => {
  it(`a share-link viewer can leave ${RULES.guestNoteAddress.limit} comments an hour from one address, then 429`, async () => {
    const studio = await makeStudio();
    const { token } = await shareLink(studio);
    const statuses: number[] = [];
    for (let i = 0; i <= RULES.guestNoteAddress.limit; i++) {
      statuses.push((await post(APP, `/api/shared/${token}/notes`, { name: 'Dana', body: `note ${i}`, frame: 1004 }, '192.0.2.77')).status);
    }
    expect(statuses.slice(0, RULES.guestNoteAddress.limit).every((s) => s === 201)).toBe(true);
    expect(statuses[RULES.guestNoteAddress.limit]).toBe(429);
  });
});
