// `npm start`: private MariaDB, S3 stand-in, mail catcher, migrations, demo data, then the app on :4321 and a
// bake worker process beside it.
// `npm run dev` does the same but serves with `astro dev`. Ctrl-C stops everything this started.
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { spawn } from 'node:child_process';
import path from 'node:path';
import {
  appEnvironment,
  buildIfStale,
  migrate,
  projectRoot as root,
  startApp,
  startBakeWorker,
  startMailCatcher,
  startMariaDB,
  startS3,
  type Service,
} from './services';
import { appProcesses } from './app-cluster.mjs';

const dev = process.argv.includes('--dev');
const port = Number(process.env.PORT ?? 4321);
const dbPort = Number(process.env.TIDEMARK_DB_PORT ?? 3307);
const s3Port = Number(process.env.TIDEMARK_S3_PORT ?? 4569);
const smtpPort = Number(process.env.TIDEMARK_SMTP_PORT ?? 1025);
const mailWebPort = Number(process.env.TIDEMARK_MAIL_WEB_PORT ?? 1080);
const bucket = process.env.S3_BUCKET ?? 'tidemark';
const dataDir = path.join(root, '.data');
const log = (s: string) => console.log(`▸ ${s}`);

const started: Service[] = [];
let stopping = false;
async function stopAll(code: number) {
  if (stopping) return;
  stopping = true;
  console.log('\n▸ stopping…');
  for (const s of started.reverse()) {
    try {
      await s.stop();
    } catch (e) {
      console.error(`  could not stop ${s.name}:`, e);
    }
  }
  process.exit(code);
}
process.on('SIGINT', () => void stopAll(0));
process.on('SIGTERM', () => void stopAll(0));

/** The app user's database password: made once per machine, kept in .data/ (git-ignored). */
function localSecret(): string {
  mkdirSync(dataDir, { recursive: true });
  const file = path.join(dataDir, 'secrets.json');
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8')).dbPassword;
  const dbPassword = randomBytes(18).toString('base64url');
  writeFileSync(file, JSON.stringify({ dbPassword }), { mode: 0o600 });
  return dbPassword;
}

async function main() {
  const t0 = Date.now();
  const mariadb = await startMariaDB({ dataDir: path.join(dataDir, 'mariadb'), port: dbPort, database: 'tidemark', user: 'tidemark', password: localSecret(), log });
  started.push(mariadb);
  log(`MariaDB on 127.0.0.1:${dbPort}`);
  const s3 = await startS3({ dir: path.join(root, 'local-s3', 'data'), port: s3Port, bucket });
  started.push(s3);
  log(`S3 stand-in on ${s3.endpoint} (bucket ${bucket})`);
  const mail = await startMailCatcher({ dir: path.join(dataDir, 'mail'), smtpPort, webPort: mailWebPort });
  started.push(mail);
  log(`mail catcher: SMTP 127.0.0.1:${smtpPort}, web ${mail.webUrl}`);

  await migrate(mariadb.url);
  log('database migrated');
  const env = appEnvironment({ databaseUrl: mariadb.url, s3Endpoint: s3.endpoint, bucket, smtpPort, appUrl: `http://127.0.0.1:${port}`, port });
  Object.assign(process.env, env);
  const { seedDemo, DEMO_USERS } = await import('../lib/server/seed');
  const { closeDb } = await import('../lib/server/db');
  await seedDemo();
  await closeDb();
  log('demo studio ready');

  // The web server bakes nothing itself (BAKE_WORKERS sizes the worker process): a bake cannot take the site down.
  const bakeWorkers = process.env.BAKE_WORKERS;
  delete process.env.BAKE_WORKERS;
  if (dev) {
    const child = spawn(path.join(root, 'node_modules', '.bin', 'astro'), ['dev', '--host', '127.0.0.1', '--port', String(port)], {
      cwd: root,
      env: { ...process.env, ...env },
      stdio: 'inherit',
    });
    started.push({ name: 'astro dev', stop: async () => void child.kill('SIGTERM') });
    child.on('exit', (code) => void stopAll(code ?? 0));
  } else {
    await buildIfStale(log);
    // APP_PROCESSES: app processes behind Node's cluster module (a count, or "auto": one per core; default 1).
    const app = await startApp(env, log, 'dist', appProcesses());
    started.push(app);
    app.child.on('exit', (code) => {
      if (!stopping) {
        console.error(`the app exited (code ${code})`);
        void stopAll(1);
      }
    });
  }

  const worker = await startBakeWorker(bakeWorkers ? { ...env, BAKE_WORKERS: bakeWorkers } : env, log);
  started.push(worker);
  worker.child.on('exit', (code) => {
    if (!stopping) {
      console.error(`the bake worker exited (code ${code})`);
      void stopAll(1);
    }
  });

  console.log(`
  Tidemark is running (${((Date.now() - t0) / 1000).toFixed(1)} s)

    app          http://127.0.0.1:${port}
    mail view    ${mail.webUrl}   (every e-mail the app sends lands here)

  Demo sign-ins (studio "Saltmarsh Pictures"; demo only):
${DEMO_USERS.map((u) => `    ${u.role.padEnd(11)} ${u.email.padEnd(26)} ${u.password}`).join('\n')}

  Press Ctrl-C to stop.
`);
}

main().catch(async (err) => {
  console.error(`✗ ${err instanceof Error ? err.message : err}`);
  await stopAll(1);
});
