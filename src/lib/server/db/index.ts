// The database handle: one mysql2 pool per process, opened on first use.
import { createPool, type Pool } from 'mysql2';
import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import * as schema from './schema';
import { config } from '../config';

export type Db = MySql2Database<typeof schema>;

let pool: Pool | undefined;
let handle: Db | undefined;

/** Returns the shared drizzle handle ('planetscale' mode: the session adapter needs it; no LATERAL joins). */
export function db(): Db {
  if (!handle) {
    pool = createPool({ uri: config.databaseUrl, connectionLimit: 10, timezone: 'Z' });
    // Dates are UTC everywhere: drizzle writes them as UTC, and NOW() must agree for lease arithmetic.
    pool.on('connection', (conn) => conn.query("SET time_zone = '+00:00'"));
    handle = drizzle(pool, { schema, mode: 'planetscale' });
  }
  return handle;
}

/** Closes the pool (scripts and tests call this before exiting). */
export async function closeDb(): Promise<void> {
  if (pool) {
    const p = pool;
    pool = undefined;
    handle = undefined;
    await new Promise<void>((resolve) => p.end(() => resolve()));
  }
}

export { schema };
