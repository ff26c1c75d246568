// Starts a bake worker thread: registers the TypeScript loader, then runs thread.ts.
import { register } from 'tsx/esm/api';
import { workerData } from 'node:worker_threads';

register();
await import(workerData.entry);
