// `npm run worker`: a standalone bake machine. Runs BAKE_WORKERS threads (default cores − 1) against the
// same MariaDB and object store as the app servers (DATABASE_URL, S3_*). Start as many machines as needed.
import { startBakePool, poolSize } from '../lib/bake/pool';

if (!process.env.DATABASE_URL) {
  console.error('Set DATABASE_URL and the S3_* variables (see README: Configuration)');
  process.exit(2);
}
const size = Math.max(1, poolSize());
const pool = startBakePool(size);
const stop = async () => {
  await pool.stop();
  process.exit(0);
};
process.on('SIGINT', () => void stop());
process.on('SIGTERM', () => void stop());
