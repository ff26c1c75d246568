// Test support: an HTTP client with its own cookie jar, studios made to order, and the mail catcher's inbox.
import { eq } from 'drizzle-orm';
import { randomBytes } from 'node:crypto';
import { db } from '../../src/lib/server/db';
import { clientShows, memberships, studios, users } from '../../src/lib/server/db/schema';
import { hashPassword } from '../../src/lib/server/password';
import { newUserId } from '../../src/lib/server/tokens';
import type { Role } from '../../src/lib/vocab';

export const APP = process.env.TEST_APP_URL ?? '';
export const MAIL = process.env.TEST_MAIL_URL ?? '';
if (!APP) throw new Error('Run the tests with `npm test` (it starts the services and the app).');

export const unique = (prefix: string) => `${prefix}-${randomBytes(5).toString('hex')}`;

/** A browser-like HTTP client: keeps cookies, sends JSON, returns status and parsed body. */
export class Client {
  cookies = new Map<string, string>();
  constructor(public ip = `10.9.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`) {}

  async request(method: string, path: string, body?: unknown, raw?: string): Promise<{ status: number; body: any; headers: Headers }> {
    const headers: Record<string, string> = { origin: APP, 'x-forwarded-for': this.ip };
    if (this.cookies.size) headers.cookie = [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
    if (body !== undefined || raw !== undefined) headers['content-type'] = 'application/json';
    const res = await fetch(APP + path, { method, headers, body: raw ?? (body === undefined ? undefined : JSON.stringify(body)), redirect: 'manual' });
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';');
      const i = pair.indexOf('=');
      const name = pair.slice(0, i);
      const value = pair.slice(i + 1);
      if (value === '' || /max-age=0/i.test(c)) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    const text = await res.text();
    let parsed: any = text;
    try {
      parsed = text ? JSON.parse(text) : null;
    } catch {
      /* HTML or empty */
    }
    return { status: res.status, body: parsed, headers: res.headers };
  }
  get = (p: string) => this.request('GET', p);
  post = (p: string, b?: unknown) => this.request('POST', p, b ?? {});
  patch = (p: string, b?: unknown) => this.request('PATCH', p, b ?? {});
  delete = (p: string) => this.request('DELETE', p);

  async signIn(email: string, password: string) {
    const res = await this.post('/api/auth/sign-in', { email, password });
    if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
    return this;
  }
}

export interface TestUser {
  id: string;
  email: string;
  name: string;
  password: string;
  role: Role;
  client: Client;
}

export interface TestStudio {
  id: number;
  slug: string;
  members: Record<Role, TestUser>;
}

let hashed: Promise<string> | undefined;
const PASSWORD = 'correct-horse-battery';

/** Makes a user directly in the database (password: 'correct-horse-battery'). */
export async function makeUser(name = 'Test Person'): Promise<{ id: string; email: string; name: string; password: string }> {
  hashed ??= hashPassword(PASSWORD);
  const id = newUserId();
  const email = `${unique('u')}@test.example`;
  await db().insert(users).values({ id, email, name, passwordHash: await hashed });
  return { id, email, name, password: PASSWORD };
}

/** Makes a studio with one signed-in member per role. */
export async function makeStudio(): Promise<TestStudio> {
  const slug = unique('studio');
  const [res] = await db().insert(studios).values({ slug, name: `Studio ${slug}` });
  const id = Number(res.insertId);
  const members = {} as Record<Role, TestUser>;
  for (const role of ['owner', 'supervisor', 'artist', 'client'] as Role[]) {
    const u = await makeUser(`${role} of ${slug}`);
    await db().insert(memberships).values({ studioId: id, userId: u.id, role });
    const client = await new Client().signIn(u.email, u.password);
    members[role] = { ...u, role, client };
  }
  return { id, slug, members };
}

/** Names the show in the studio's test client membership (a client sees only the shows its membership names). */
export async function grantClientShow(s: TestStudio, showId: number, userId = s.members.client.id) {
  await db().insert(clientShows).values({ studioId: s.id, userId, showId }).onDuplicateKeyUpdate({ set: { showId } });
}

export async function membershipId(studioId: number, userId: string): Promise<number> {
  const rows = await db().select().from(memberships).where(eq(memberships.userId, userId));
  const row = rows.find((r) => r.studioId === studioId);
  if (!row) throw new Error('no membership');
  return row.id;
}

export interface CaughtMail {
  subject: string;
  text: string;
  html: string;
  to: { address: string }[];
}

/** Waits for an e-mail to the address at the mail catcher and returns the newest one. */
export async function waitForMail(address: string, match: (m: CaughtMail) => boolean = () => true, timeoutMs = 10_000): Promise<CaughtMail> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const res = await fetch(`${MAIL}/api/email?to.address=${encodeURIComponent(address)}`);
    if (res.ok) {
      const list = ((await res.json()) as CaughtMail[]).filter(match);
      if (list.length) return list[list.length - 1];
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`no e-mail to ${address} arrived within ${timeoutMs} ms`);
}

/** Pulls the first link to the app out of an e-mail's text. */
export function linkIn(mail: CaughtMail): string {
  const m = mail.text.match(new RegExp(`${APP.replace(/[.:/]/g, '\\$&')}/[^\\s]+`));
  if (!m) throw new Error(`no app link in: ${mail.text}`);
  return m[0];
}
