// `npm run worker` (and the bake process `npm start` runs beside the web server): a bake machine. Runs BAKE_WORKERS
// slots (default cores − 1) against the same MariaDB and object store as the app servers (DATABASE_URL, S3_*).
// Start as many as needed. SIGTERM or SIGINT hands running jobs back to the queue before it exits.
import { startBakePool, poolSize } from '../lib/bake/pool';
import { closeDb } from '../lib/server/db';

if (!process.env.DATABASE_URL) {
  console.error('Set DATABASE_URL and the S3_* variables (see README: Configuration)');
  process.exit(2);
}
const size = Math.max(1, poolSize());
const pool = startBakePool(size);
let stopping = false;
const stop = async () => {
  if (stopping) return;
  stopping = true;
  await pool.stop();
  await closeDb();
  process.exit(0);
};
process.on('SIGINT', () => void stop());
process.on('SIGTERM', () => void stop());
