// Test support: another process of the built test app on its own port, sharing the database, store and mail catcher
// (to check what several app servers, a restart, or a different environment do).
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { freePort, projectRoot } from '../../src/cli/services';

export interface SecondApp {
  url: string;
  child: ChildProcess;
  output: () => string;
  stop: () => Promise<void>;
}

/** Spawns `node .data/test-dist/server/entry.mjs` with the test environment plus `env`; waits until it answers. */
export async function startSecondApp(env: Record<string, string> = {}, opts: { port?: number; expectExit?: boolean } = {}): Promise<SecondApp> {
  const port = opts.port ?? (await freePort());
  const url = `http://127.0.0.1:${port}`;
  let out = '';
  const child = spawn(process.execPath, [path.join(projectRoot, '.data', 'test-dist', 'server', 'entry.mjs')], {
    cwd: projectRoot,
    env: { ...process.env, HOST: '127.0.0.1', PORT: String(port), TIDEMARK_TEST: '1', TRUSTED_PROXIES: 'loopback', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (out += d));
  const exited = new Promise<void>((r) => child.once('exit', () => r()));
  const stop = async () => {
    if (child.exitCode !== null || child.signalCode !== null) return;
    child.kill('SIGTERM');
    const timer = setTimeout(() => child.kill('SIGKILL'), 10_000);
    await exited;
    clearTimeout(timer);
  };
  if (opts.expectExit) {
    await Promise.race([exited, new Promise((r) => setTimeout(r, 20_000))]);
    return { url, child, output: () => out, stop };
  }
  for (let i = 0; i < 300; i++) {
    if (child.exitCode !== null) throw new Error(`the second app exited: ${out}`);
    try {
      const res = await fetch(`${url}/sign-in`);
      if (res.status < 500) return { url, child, output: () => out, stop };
    } catch {
      /* starting */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  await stop();
  throw new Error(`the second app did not answer on ${url}: ${out}`);
}
