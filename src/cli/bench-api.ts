// `npm run bench -- api`: load on the library API of the real built app, with its own throwaway MariaDB, S3 stand-in
// and mail catcher (the services npm test uses), seeded with the demo studio. One app process pinned to one core
// (taskset, when present) answers autocannon at 10 and 50 connections: the shots list of a show, the calls the
// version page makes, and /api/me. Prints requests/s, latency p50/p95/p99 and errors, then one JSON line.
//
// Sign-in is throttled (src/lib/server/throttle.ts): the bench signs in once and every request reuses that cookie.
// BENCH_API_SECONDS sets each run's length (default 10); BENCH_API_PROCESSES=n|auto runs n app processes (cluster). BENCH_API_BASELINE=/path/to/dist also loads a second build
// (e.g. an older commit's `astro build`) against the same database in the same run and prints the ratio.
import autocannon from 'autocannon';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import {
  appEnvironment,
  buildIfStale,
  freePort,
  migrate,
  startApp,
  startMailCatcher,
  startMariaDB,
  startS3,
  type Service,
} from './services';
import { appProcesses } from './app-cluster.mjs';

const SECONDS = Number(process.env.BENCH_API_SECONDS ?? 10);
const CONNECTIONS = [10, 50];
// BENCH_API_PROCESSES=n (or auto) runs the app as n processes behind the cluster module, as APP_PROCESSES does.
const PROCESSES = appProcesses(process.env.BENCH_API_PROCESSES);
const log = (s: string) => console.log(`▸ ${s}`);
const started: Service[] = [];
const scratch = mkdtempSync(path.join(tmpdir(), 'tidemark-bench-api-'));

async function stopAll() {
  for (const s of started.reverse()) await s.stop().catch((e) => console.error(`could not stop ${s.name}:`, e));
  rmSync(scratch, { recursive: true, force: true });
}
for (const signal of ['SIGINT', 'SIGTERM'] as const) process.on(signal, () => void stopAll().then(() => process.exit(130)));

interface Figures {
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
  non2xx: number;
  requests: number;
}

async function load(url: string, cookie: string, paths: string[], connections: number, seconds: number): Promise<Figures> {
  // autocannon's histogram keeps p97.5 but not p95: every response time is kept here and the percentiles read from it.
  const times: number[] = [];
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const run = autocannon(
      {
        url,
        connections,
        duration: seconds,
        headers: { cookie, accept: 'application/json' },
        // Each connection walks the list in turn (the version page's calls are several requests).
        requests: paths.map((p) => ({ method: 'GET', path: p })),
      },
      (err, res) => (err ? reject(err) : resolve(res)),
    );
    run.on('response', (_client, _status, _bytes, ms) => times.push(ms));
  });
  times.sort((a, b) => a - b);
  const at = (q: number) => (times.length ? Math.round(times[Math.min(times.length - 1, Math.floor(q * times.length))] * 10) / 10 : NaN);
  return {
    rps: result.requests.average,
    p50: at(0.5),
    p95: at(0.95),
    p99: at(0.99),
    errors: result.errors + result.timeouts,
    non2xx: result.non2xx,
    requests: result.requests.total,
  };
}

/** Starts one app build (pinned to core 0 when taskset exists and it is one process) and returns it with its URL. */
async function appOn(entryDir: string, env: Record<string, string>, port: number) {
  const pinned = PROCESSES === 1 && spawnSync('taskset', ['--version']).status === 0;
  const app = await startApp({ ...env, PORT: String(port), APP_URL: `http://127.0.0.1:${port}` }, log, entryDir, PROCESSES);
  started.push(app);
  if (pinned && app.child.pid) spawnSync('taskset', ['-a', '-p', '-c', '0', String(app.child.pid)], { stdio: 'ignore' });
  return { app, url: `http://127.0.0.1:${port}`, pinned };
}

async function signIn(url: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${url}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: url },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${await res.text()}`);
  const cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).find((c) => c.startsWith('tidemark_session='));
  if (!cookie) throw new Error('sign-in set no session cookie');
  return cookie;
}

async function getJson(url: string, cookie: string, p: string): Promise<any> {
  const res = await fetch(url + p, { headers: { cookie } });
  if (!res.ok) throw new Error(`GET ${p}: ${res.status} ${await res.text()}`);
  return res.json();
}

const fmt = (f: Figures) =>
  `${f.rps.toFixed(0).padStart(6)} req/s   p50 ${String(f.p50).padStart(4)} ms   p95 ${String(f.p95).padStart(4)} ms   p99 ${String(f.p99).padStart(4)} ms   errors ${f.errors}   non-2xx ${f.non2xx}   (${f.requests} requests)`;

async function benchOne(label: string, url: string, cookie: string, targets: [string, string[]][]) {
  const out: Record<string, Figures> = {};
  // Warm-up: JIT, the pool's connections and the caches, outside the figures.
  for (const [, paths] of targets) await load(url, cookie, paths, 10, 2);
  for (const [name, paths] of targets) {
    for (const c of CONNECTIONS) {
      const f = await load(url, cookie, paths, c, SECONDS);
      out[`${name}@${c}`] = f;
      console.log(`  ${label.padEnd(8)} ${name.padEnd(13)} ${String(c).padStart(2)} conn  ${fmt(f)}`);
    }
  }
  return out;
}

async function main() {
  const bucket = 'tidemark-bench';
  const [dbPort, s3Port, smtpPort, mailWebPort, appPort, basePort] = await Promise.all(Array.from({ length: 6 }, freePort));
  const mariadb = await startMariaDB({ dataDir: path.join(scratch, 'mariadb'), port: dbPort, database: 'tidemark_bench', user: 'tidemark', password: 'bench-only-password', log });
  started.push(mariadb);
  const s3 = await startS3({ dir: path.join(scratch, 's3'), port: s3Port, bucket, resetOnClose: true });
  started.push(s3);
  const mail = await startMailCatcher({ dir: path.join(scratch, 'mail'), smtpPort, webPort: mailWebPort });
  started.push(mail);
  await migrate(mariadb.url);
  const env = appEnvironment({ databaseUrl: mariadb.url, s3Endpoint: s3.endpoint, bucket, smtpPort, appUrl: `http://127.0.0.1:${appPort}`, port: appPort });
  Object.assign(process.env, env);
  const { seedDemo, DEMO_USERS } = await import('../lib/server/seed');
  const { closeDb } = await import('../lib/server/db');
  await seedDemo();
  await closeDb();
  log('demo studio seeded');

  await buildIfStale(log);
  const builds: [string, string, number][] = [['current', 'dist', appPort]];
  if (process.env.BENCH_API_BASELINE) builds.push(['baseline', path.resolve(process.env.BENCH_API_BASELINE), basePort]);

  const supervisor = DEMO_USERS.find((u) => u.role === 'supervisor')!;
  const results: Record<string, Record<string, Figures>> = {};
  let pinnedAll = true;
  for (const [label, dir, port] of builds) {
    const { app, url, pinned } = await appOn(dir, env, port);
    pinnedAll &&= pinned;
    try {
      const cookie = await signIn(url, supervisor.email, supervisor.password);
      const me = await getJson(url, cookie, '/api/me');
      const studioId: number = me.studios[0].id;
      const shows = await getJson(url, cookie, `/api/studios/${studioId}/shows?sort=code`);
      // The show with the most shots: the show screen's first page, as its table asks for it.
      const show = [...shows.items].sort((a: any, b: any) => b.shotCount - a.shotCount)[0];
      const shotsPath = `/api/studios/${studioId}/shots?showId=${show.id}&archived=false&sort=code&order=asc&page=1&pageSize=50`;
      const shotsPage = await getJson(url, cookie, shotsPath);
      const shot = shotsPage.items.find((s: any) => s.thumbnailUrl) ?? shotsPage.items[0];
      const { versions } = await getJson(url, cookie, `/api/shots/${shot.id}/versions`);
      const v = versions[0].id;
      // What the version page asks for once it is up (its review panel, share panel, export panel and bake status).
      const versionPage = [`/api/versions/${v}`, `/api/versions/${v}/review`, `/api/versions/${v}/notes?carried=1`, `/api/versions/${v}/bake`, `/api/versions/${v}/share-links`, `/api/versions/${v}/exports`];
      if (label === 'current') console.log(`\n  show ${show.code}: ${shotsPage.items.length} shots on the page (${shotsPage.items.filter((s: any) => s.thumbnailUrl).length} with thumbnails); version ${v}; ${SECONDS} s per run; ${pinned ? 'one app process pinned to core 0' : `${PROCESSES} app process(es)`}\n`);
      results[label] = await benchOne(label, url, cookie, [
        ['shots list', [shotsPath]],
        ['version page', versionPage],
        ['/api/me', ['/api/me']],
      ]);
    } finally {
      started.splice(started.indexOf(app), 1);
      await app.stop();
    }
  }
  if (results.baseline) {
    console.log('\n  current ÷ baseline, requests/s:');
    for (const key of Object.keys(results.current)) console.log(`    ${key.padEnd(18)} ${(results.current[key].rps / results.baseline[key].rps).toFixed(2)} ×`);
  }
  const errors = Object.values(results).flatMap((r) => Object.values(r)).reduce((n, f) => n + f.errors + f.non2xx, 0);
  console.log(errors ? `\n  ✗ ${errors} errors or non-2xx answers` : '\n  0 errors');
  console.log(JSON.stringify({ seconds: SECONDS, appProcesses: PROCESSES, pinnedToOneCore: pinnedAll, ...results }));
  return errors ? 1 : 0;
}

main()
  .then(async (code) => {
    await stopAll();
    process.exit(code);
  })
  .catch(async (err) => {
    console.error(`✗ ${err instanceof Error ? err.stack : err}`);
    await stopAll();
    process.exit(1);
  });
