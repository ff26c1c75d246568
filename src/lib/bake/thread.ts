// One bake worker thread: runs the claim-bake loop until the parent asks it to stop.
import { parentPort, workerData } from 'node:worker_threads';
import { runBakeLoop } from './runner';
import { closeDb } from '../server/db';

const controller = new AbortController();
parentPort?.on('message', (m) => {
  if (m === 'stop') controller.abort();
});

await runBakeLoop({ workerId: workerData.workerId, signal: controller.signal });
await closeDb();
// The message listener would keep the thread alive: end it explicitly.
process.exit(0);
