// The database handle: one mysql2 pool per process, opened on first use.
import { AsyncLocalStorage } from 'node:async_hooks';
import { createPool, type Pool, type PoolConnection } from 'mysql2';
import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import * as schema from './schema';
import { config } from '../config';

export type Db = MySql2Database<typeof schema>;

let pool: Pool | undefined;

/** Counts the queries drizzle sends within a countQueries() call (its logger sees each one; tests read the count). */
const counted = new AsyncLocalStorage<{ queries: number }>();
const logger = { logQuery: () => void (counted.getStore() && counted.getStore()!.queries++) };

/** Runs fn, counting the queries sent through drizzle on its behalf (also those of async work it awaits). */
export function countQueries<T>(fn: () => T): { result: T; counter: { queries: number } } {
  const counter = { queries: 0 };
  return { result: counted.run(counter, fn), counter };
}
let handle: Db | undefined;

/** Returns the shared drizzle handle ('planetscale' mode: the session adapter needs it; no LATERAL joins). */
export function db(): Db {
  if (!handle) {
    pool = createPool({ uri: config.databaseUrl, connectionLimit: 10, timezone: 'Z' });
    // Dates are UTC everywhere: drizzle writes them as UTC, and NOW() must agree for lease arithmetic.
    pool.on('connection', (conn) => conn.query("SET time_zone = '+00:00'"));
    handle = drizzle(pool, { schema, mode: 'planetscale', logger });
  }
  return handle;
}

/**
 * Runs `fn` on one connection of the pool held for the whole call (named locks and multi-statement work that must
 * not hop connections), then gives the connection back.
 */
export async function withConnection<T>(fn: (conn: Db) => Promise<T>): Promise<T> {
  db();
  const conn = await new Promise<PoolConnection>((resolve, reject) => pool!.getConnection((err, c) => (err ? reject(err) : resolve(c))));
  try {
    return await fn(drizzle(conn, { schema, mode: 'planetscale', logger }));
  } finally {
    conn.release();
  }
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
