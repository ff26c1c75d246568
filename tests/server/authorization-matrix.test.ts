// The authorization matrix: every endpoint called as anonymous, as each role, and as a member of another studio.
// Expected: anonymous → 401; another studio's member → 404 (existence is not confirmed); a role below → 403; allowed → 2xx.
// 'client-only' endpoints (the client's own sign-off) allow the client role alone: every studio role gets 403.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { Client, makeStudio, type TestStudio } from '../support/app';
import { ENDPOINTS, type Access } from './endpoints';
import { roleAtLeast } from '../../src/lib/server/authz';
import { closeDb } from '../../src/lib/server/db';
import { ROLES } from '../../src/lib/vocab';

let studio: TestStudio;
let other: TestStudio;
beforeAll(async () => {
  [studio, other] = await Promise.all([makeStudio(), makeStudio()]);
});
afterAll(closeDb);

function apiRoutes(): { method: string; route: string }[] {
  const dir = path.resolve(__dirname, '../../src/pages');
  const out: { method: string; route: string }[] = [];
  const visit = (p: string) => {
    for (const name of readdirSync(p)) {
      const full = path.join(p, name);
      if (statSync(full).isDirectory()) visit(full);
      else if (/\.(ts|js)$/.test(name)) {
        const route = '/' + path.relative(dir, full).replace(/\.(ts|js)$/, '').replace(/\/index$/, '');
        for (const m of readFileSync(full, 'utf8').matchAll(/export const (GET|POST|PATCH|PUT|DELETE)\b/g)) out.push({ method: m[1], route });
      }
    }
  };
  visit(path.join(dir, 'api'));
  return out;
}

const allowed = (access: Access, role: (typeof ROLES)[number]) =>
  access === 'client-only' ? role === 'client' : access === 'public' || access === 'signed-in' || roleAtLeast(role, access);

describe('authorization matrix', () => {
  it('lists every API endpoint (add new ones to tests/server/endpoints.ts)', () => {
    const listed = new Set(ENDPOINTS.map((e) => `${e.method} ${e.route}`));
    const missing = apiRoutes()
      .map((r) => `${r.method} ${r.route}`)
      .filter((r) => !listed.has(r));
    expect(missing).toEqual([]);
  });

  for (const e of ENDPOINTS.filter((x) => x.access !== 'public')) {
    describe(`${e.method} ${e.route} (${e.access})`, () => {
      it('anonymous → 401', async () => {
        const res = await new Client().request(e.method, await e.path(studio), e.body?.(studio));
        expect(res.status).toBe(401);
        expect(res.body.error.code).toBe('unauthenticated');
      });
      if (e.access !== 'signed-in') {
        it('a member of another studio → 404', async () => {
          const res = await other.members.owner.client.request(e.method, await e.path(studio), e.body?.(studio));
          expect(res.status).toBe(404);
        });
      }
      for (const role of ROLES) {
        const ok = allowed(e.access, role);
        it(`${role} → ${ok ? '2xx' : '403'}`, async () => {
          const res = await studio.members[role].client.request(e.method, await e.path(studio), e.body?.(studio));
          if (ok) expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(200);
          if (ok) expect(res.status, JSON.stringify(res.body)).toBeLessThan(300);
          else expect(res.status).toBe(403);
        });
      }
    });
  }
});
