// Runs the built app server (the entry given as the first argument) as APP_PROCESSES processes behind Node's cluster
// module: they share the one port and the primary hands connections out. APP_PROCESSES is a count, or "auto" for one
// per core. A process that dies is replaced; SIGTERM/SIGINT stops them all. Bakes never run here (src/cli/worker.ts).
// Plain JavaScript so the app processes start without a TypeScript loader.
import cluster from 'node:cluster';
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';

/** The number of app processes APP_PROCESSES asks for (default 1). */
export function appProcesses(value = process.env.APP_PROCESSES) {
  if (!value) return 1;
  if (value.trim().toLowerCase() === 'auto') return availableParallelism();
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1 || n > 256) throw new Error(`APP_PROCESSES must be a whole number from 1 to 256, or auto (got "${value}")`);
  return n;
}

const entry = process.argv[2];
if (cluster.isPrimary && entry && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const n = appProcesses();
  let stopping = false;
  const fork = () => cluster.fork();
  for (let i = 0; i < n; i++) fork();
  console.log(`[app] ${n} app processes behind one port (APP_PROCESSES)`);
  cluster.on('exit', (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    console.error(`[app] app process ${worker.process.pid} exited (${signal ?? code}); starting another`);
    setTimeout(fork, 500);
  });
  const stop = () => {
    if (stopping) return;
    stopping = true;
    const workers = Object.values(cluster.workers ?? {});
    if (workers.length === 0) process.exit(0);
    for (const w of workers) w?.process.kill('SIGTERM');
    setTimeout(() => process.exit(0), 10_000).unref();
  };
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
} else if (cluster.isWorker) {
  await import(pathToFileURL(entry).href);
}
