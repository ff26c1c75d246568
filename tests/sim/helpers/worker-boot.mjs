// Starts a Node worker thread on a TypeScript module: registers tsx's loader, then imports workerData.entry.
// It lives inside the repository so that 'tsx' resolves from node_modules.
import { register } from 'tsx/esm/api';
import { workerData } from 'node:worker_threads';

register();
await import(workerData.entry);
