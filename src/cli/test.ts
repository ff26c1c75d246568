// `npm test`: throwaway MariaDB, S3 stand-in and mail catcher on free ports, the built app, then every vitest test.
// Everything it starts is stopped and its data removed, whether the tests pass or fail.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { spawn } from 'node:child_process';
import {
  appEnvironment,
  buildIfStale,
  freePort,
  migrate,
  projectRoot as root,
  startApp,
  startBakeWorker,
  startMailCatcher,
  startMariaDB,
  startS3,
  type Service,
} from './services';

const log = (s: string) => console.log(`▸ ${s}`);
const started: Service[] = [];
const scratch = mkdtempSync(path.join(tmpdir(), 'tidemark-test-'));
let stopping = false;

async function stopAll() {
  if (stopping) return;
  stopping = true;
  for (const s of started.reverse()) {
    try {
      await s.stop();
    } catch (e) {
      console.error(`could not stop ${s.name}:`, e);
    }
  }
  if (!process.env.TEST_KEEP) rmSync(scratch, { recursive: true, force: true });
}

for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => void stopAll().then(() => process.exit(130)));
}

async function main(): Promise<number> {
  const t0 = Date.now();
  const bucket = 'tidemark-test';
  const [dbPort, s3Port, smtpPort, mailWebPort, appPort] = await Promise.all([freePort(), freePort(), freePort(), freePort(), freePort()]);
  const mariadb = await startMariaDB({ dataDir: path.join(scratch, 'mariadb'), port: dbPort, database: 'tidemark_test', user: 'tidemark', password: 'test-only-password', log });
  started.push(mariadb);
  const s3 = await startS3({ dir: path.join(scratch, 's3'), port: s3Port, bucket, resetOnClose: true, extraOrigins: [`http://127.0.0.1:${appPort}`] });
  started.push(s3);
  const mail = await startMailCatcher({ dir: path.join(scratch, 'mail'), smtpPort, webPort: mailWebPort });
  started.push(mail);
  await migrate(mariadb.url);
  log(`services up in ${((Date.now() - t0) / 1000).toFixed(1)} s (MariaDB :${dbPort}, S3 :${s3Port}, SMTP :${smtpPort})`);

  const appUrl = `http://127.0.0.1:${appPort}`;
  const env = appEnvironment({ databaseUrl: mariadb.url, s3Endpoint: s3.endpoint, bucket, smtpPort, appUrl, port: appPort });
  await buildIfStale(log, '.data/test-dist');
  // The tests are the app's proxy: they send X-Forwarded-For from loopback, so loopback is a trusted hop.
  const app = await startApp({ ...env, TIDEMARK_TEST: '1', TRUSTED_PROXIES: 'loopback' }, log, '.data/test-dist');
  started.push(app);
  // Bakes run beside the app in a worker process of their own, as under `npm start`.
  const worker = await startBakeWorker({ ...env, BAKE_WORKERS: process.env.TEST_BAKE_WORKERS ?? '1' }, log);
  started.push(worker);

  const args = ['run', '--config', 'tests/vitest.config.ts', ...process.argv.slice(2)];
  const code = await new Promise<number>((resolve) => {
    const child = spawn(path.join(root, 'node_modules', '.bin', 'vitest'), args, {
      cwd: root,
      stdio: 'inherit',
      env: {
        ...process.env,
        ...env,
        TEST_APP_URL: appUrl,
        TEST_APP_PID: String(app.child.pid),
        TEST_BAKE_WORKER_PID: String(worker.child.pid),
        TEST_MAIL_URL: mail.webUrl,
        TEST_SCRATCH: scratch,
        TEST_DB_ROOT_SOCKET: path.join(scratch, 'mariadb', 'mariadb.sock'),
      },
    });
    child.on('close', (c) => resolve(c ?? 1));
  });
  log(`tests finished in ${((Date.now() - t0) / 1000).toFixed(0)} s with exit code ${code}`);
  return code;
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
