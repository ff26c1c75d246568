// Security headers on pages and API answers (CSP with Astro's script hashes, no framing, no sniffing), the session's
// absolute lifetime, and the production start check of the built server.
import { describe, it, expect } from 'vitest';
import { eq } from 'drizzle-orm';
import { createHash } from 'node:crypto';
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { APP, Client, makeStudio, makeUser } from '../support/app';
import { ENDPOINTS } from './endpoints';
import { startSecondApp } from '../support/second-app';
import { db } from '../../src/lib/server/db';
import { sessions } from '../../src/lib/server/db/schema';

const directive = (policy: string | null, name: string) =>
  (policy ?? '')
    .split(';')
    .map((p) => p.trim())
    .find((p) => p.split(/\s+/)[0] === name)
    ?.split(/\s+/)
    .slice(1) ?? null;

describe('security headers', () => {
  const paths = ['/sign-in', '/forgot-password', '/share/not-a-token', '/api/me', '/api/studios/1/shows', '/no-such-page', '/'];
  for (const p of paths) {
    it(`${p} carries a CSP with frame-ancestors 'none', nosniff and X-Frame-Options`, async () => {
      const res = await new Client().get(p);
      const csp = res.headers.get('content-security-policy');
      expect(res.headers.get('x-content-type-options')).toBe('nosniff');
      expect(directive(csp, 'frame-ancestors')).toEqual(["'none'"]);
      expect(res.headers.get('x-frame-options')).toBe('DENY');
      expect(directive(csp, 'script-src') ?? directive(csp, 'default-src')).not.toContain("'unsafe-inline'");
    });
  }

  it('a signed-in page and API answer carry them too', async () => {
    const u = await makeUser();
    const c = await new Client().signIn(u.email, u.password);
    for (const p of ['/', '/api/me']) {
      const res = await c.get(p);
      expect(res.headers.get('x-content-type-options')).toBe('nosniff');
      expect(directive(res.headers.get('content-security-policy'), 'frame-ancestors')).toEqual(["'none'"]);
    }
  });

  it('every inline script of a page is allowed by a hash in script-src (nothing else inline runs)', async () => {
    const res = await fetch(APP + '/sign-in');
    const html = await res.text();
    const allowed = directive(res.headers.get('content-security-policy'), 'script-src')!;
    const inline = [...html.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]).filter((s) => s.trim());
    expect(inline.length).toBeGreaterThan(0); // the island loader is inline
    for (const code of inline) {
      const hash = `'sha256-${createHash('sha256').update(code).digest('base64')}'`;
      expect(allowed).toContain(hash);
    }
  });

  /** Every page route under src/pages (not the API), as its file route, e.g. /studios/[slug]/shots/[shotId]. */
  const pageRoutes = () => {
    const dir = path.resolve(__dirname, '../../src/pages');
    const out: string[] = [];
    const visit = (p: string) => {
      for (const name of readdirSync(p)) {
        const full = path.join(p, name);
        if (statSync(full).isDirectory()) {
          if (full !== path.join(dir, 'api')) visit(full);
        } else if (name.endsWith('.astro')) out.push('/' + path.relative(dir, full).replace(/\.astro$/, '').replace(/(^|\/)index$/, ''));
      }
    };
    visit(dir);
    return out;
  };
  const hasHeaders = (res: { headers: Headers }) =>
    res.headers.get('x-content-type-options') === 'nosniff' && directive(res.headers.get('content-security-policy'), 'frame-ancestors')?.join(' ') === "'none'";

  it('every API endpoint (each method, signed out and as the owner) and every page route answers with them', async () => {
    const s = await makeStudio();
    const fill = (route: string) =>
      route.replace(/\[(\w+)\]/g, (_m, name: string) => (name === 'studioId' ? String(s.id) : name === 'slug' ? s.slug : name === 'token' ? 'not-a-token' : '1'));
    const anonymous = new Client();
    const missing: string[] = [];
    for (const e of ENDPOINTS) {
      const p = fill(e.route);
      const res = await anonymous.request(e.method, p, e.method === 'GET' ? undefined : {});
      if (!hasHeaders(res)) missing.push(`${e.method} ${p} (${res.status}, signed out)`);
      if (e.method !== 'GET') continue; // the owner only reads: a write with made-up ids could change the studio
      const owned = await s.members.owner.client.get(p);
      if (!hasHeaders(owned)) missing.push(`GET ${p} (${owned.status}, owner)`);
    }
    const pages = pageRoutes();
    expect(pages.length).toBeGreaterThan(5);
    for (const route of pages) {
      for (const c of [anonymous, s.members.owner.client]) {
        const res = await c.get(fill(route));
        if (!hasHeaders(res)) missing.push(`page ${fill(route)} (${res.status})`);
      }
    }
    expect(missing).toEqual([]);
  }, 120_000);

  it('the test app is served over http, so no HSTS header', async () => {
    const res = await new Client().get('/sign-in');
    expect(res.headers.get('strict-transport-security')).toBeNull();
  });
});

describe('sessions', () => {
  it('a session older than 30 days ends however recently it was used', async () => {
    const u = await makeUser();
    const c = await new Client().signIn(u.email, u.password);
    expect((await c.get('/api/me')).status).toBe(200);
    await db().update(sessions).set({ createdAt: new Date(Date.now() - 31 * 86_400_000) }).where(eq(sessions.userId, u.id));
    expect((await c.get('/api/me')).status).toBe(401);
    expect(await db().select().from(sessions).where(eq(sessions.userId, u.id))).toHaveLength(0);
  });

  it('a 29-day-old session still works', async () => {
    const u = await makeUser();
    const c = await new Client().signIn(u.email, u.password);
    await db().update(sessions).set({ createdAt: new Date(Date.now() - 29 * 86_400_000) }).where(eq(sessions.userId, u.id));
    expect((await c.get('/api/me')).status).toBe(200);
  });
});

describe('production start check', () => {
  it('the built server refuses to start with a public http APP_URL', async () => {
    const app = await startSecondApp({ APP_URL: 'http://previs.example.com' }, { expectExit: true });
    expect(app.child.exitCode).toBe(1);
    expect(app.output()).toMatch(/APP_URL must be https/);
  });

  it('starts with a public http APP_URL when told a proxy terminates HTTPS', async () => {
    const app = await startSecondApp({ APP_URL: 'http://previs.example.com', BEHIND_PROXY: 'true' });
    try {
      const res = await fetch(app.url + '/sign-in');
      expect(res.status).toBe(200);
    } finally {
      await app.stop();
    }
  });

  it('an https APP_URL turns on HSTS', async () => {
    const app = await startSecondApp({ APP_URL: 'https://previs.example.com' });
    try {
      const res = await fetch(app.url + '/api/me');
      expect(res.headers.get('strict-transport-security')).toMatch(/max-age=\d+/);
    } finally {
      await app.stop();
    }
  });
});
