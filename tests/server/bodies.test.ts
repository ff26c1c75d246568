// Bounded bodies: every public POST reads its body through one stream reader that stops at the route's limit, so a
// 10 MB chunked body (no Content-Length) is refused with 413 instead of being read whole.
import { describe, it, expect, beforeAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { APP, makeStudio, type TestStudio } from '../support/app';
import { startSecondApp } from '../support/second-app';
import { ENDPOINTS, makeShot } from './endpoints';

const TEN_MB = 10 * 1024 * 1024;

/** Sends `total` bytes of JSON-looking text as a chunked stream (fetch sets no Content-Length on a stream). */
async function chunkedPost(path: string, total: number, contentType = 'application/json', base = APP) {
  let sent = 0;
  const chunk = new TextEncoder().encode('{"x":"' + 'a'.repeat(64 * 1024 - 6));
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (sent >= total) return controller.close();
      sent += chunk.byteLength;
      controller.enqueue(chunk);
    },
  });
  try {
    const res = await fetch(base + path, { method: 'POST', headers: { origin: base, 'content-type': contentType }, body, duplex: 'half' } as RequestInit);
    await res.arrayBuffer();
    return { status: res.status, sent };
  } catch (err) {
    // The server may close the connection after answering; the answer was read or the socket was reset early.
    return { status: -1, sent, err };
  }
}

describe('bounded bodies', () => {
  const publicPosts = ENDPOINTS.filter((e) => e.access === 'public' && e.method === 'POST');

  it('lists the public POST endpoints', () => {
    expect(publicPosts.length).toBeGreaterThanOrEqual(4);
  });

  for (const e of publicPosts) {
    it(`${e.route}: 10 MB chunked → 413 before the whole body is read`, async () => {
      const res = await chunkedPost(await e.path(null as never), TEN_MB);
      expect(res.status).toBe(413);
    });
  }

  it('the share page password form: 10 MB chunked → 413', async () => {
    const res = await chunkedPost('/share/not-a-real-token', TEN_MB, 'application/x-www-form-urlencoded');
    // An unknown link answers 404 before the body is read; either way the body is never read whole.
    expect([404, 413]).toContain(res.status);
  });
});

/** Resident memory of a process in MB (Linux /proc). */
const rssMb = (pid: number) => Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))![1]) / 1024;

describe('bounded bodies and memory', () => {
  it('10 MB chunked bodies to every public POST leave the server resident memory within 20 MB', async () => {
    const app = await startSecondApp();
    try {
      const paths = await Promise.all(ENDPOINTS.filter((e) => e.access === 'public' && e.method === 'POST').map((e) => e.path(null as never)));
      // Warm up: every route's module loaded, pools opened, the 413 path taken once with a full body (the young
      // generation of the heap grows to its working size at that allocation rate and stays there).
      for (const p of paths) await chunkedPost(p, TEN_MB, 'application/json', app.url);
      await new Promise((r) => setTimeout(r, 500));
      const before = rssMb(app.child.pid!);
      // Then every route at once, three times: a server that buffered bodies whole would hold 10 MB per request.
      const rounds = 3;
      for (let round = 0; round < rounds; round++) {
        const answers = await Promise.all(paths.map((p) => chunkedPost(p, TEN_MB, 'application/json', app.url)));
        answers.forEach((a, i) => expect(a.status, `${paths[i]}: ${String((a.err as Error)?.cause ?? a.err ?? '')}`).toBe(413));
        console.log(`  after round ${round + 1} (${paths.length} × 10 MB at once): RSS ${rssMb(app.child.pid!).toFixed(1)} MB`);
      }
      const after = rssMb(app.child.pid!);
      console.log(`server RSS before ${before.toFixed(1)} MB, after ${paths.length * rounds} × 10 MB chunked bodies ${after.toFixed(1)} MB`);
      expect(after - before).toBeLessThan(20);
    } finally {
      await app.stop();
    }
  });
});

describe('client and unshared shots', () => {
  let studio: TestStudio;
  beforeAll(async () => {
    studio = await makeStudio();
  });

  it('GET /api/shots/:id/versions of a shot with nothing shared → 404 for a client, 200 for an artist', async () => {
    const shotId = await makeShot(studio);
    const asClient = await studio.members.client.client.get(`/api/shots/${shotId}/versions`);
    expect(asClient.status).toBe(404);
    const asArtist = await studio.members.artist.client.get(`/api/shots/${shotId}/versions`);
    expect(asArtist.status).toBe(200);
    expect(asArtist.body.versions).toEqual([]);
  });
});

describe('forwarded addresses', () => {
  it('an X-Forwarded-For longer than 64 characters is a normal wrong sign-in (401), not a 500', async () => {
    const res = await fetch(APP + '/api/auth/sign-in', {
      method: 'POST',
      headers: { origin: APP, 'content-type': 'application/json', 'x-forwarded-for': `10.1.2.3-${'x'.repeat(200)}` },
      body: JSON.stringify({ email: 'nobody-here@test.example', password: 'wrong-password' }),
    });
    expect(res.status).toBe(401);
  });
});
