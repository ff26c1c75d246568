// The migrations in drizzle/ apply cleanly to an empty database and create every table of the schema.
import { describe, it, expect } from 'vitest';
import { execFileSync } from 'node:child_process';
import { createConnection } from 'mysql2/promise';
import { getTableConfig } from 'drizzle-orm/mysql-core';
import * as schema from '../../src/lib/server/db/schema';
import { migrate } from '../../src/cli/services';

describe('migrations', () => {
  it('apply on an empty database', async () => {
    const socket = process.env.TEST_DB_ROOT_SOCKET!;
    const name = `empty_${Date.now()}`;
    const rootSql = (q: string) => execFileSync('mariadb', ['--no-defaults', `--socket=${socket}`, '-uroot', '-e', q]);
    rootSql(`CREATE DATABASE ${name}; GRANT ALL ON ${name}.* TO 'tidemark'@'127.0.0.1';`);
    try {
      const url = new URL(process.env.DATABASE_URL!);
      url.pathname = `/${name}`;
      await migrate(url.toString());
      const conn = await createConnection(url.toString());
      const [rows] = await conn.query('SHOW TABLES');
      await conn.end();
      const tables = (rows as Record<string, string>[]).map((r) => Object.values(r)[0]);
      const expected = Object.values(schema)
        .filter((v) => typeof v === 'object' && v !== null && Symbol.for('drizzle:IsDrizzleTable') in v)
        .map((t) => getTableConfig(t as any).name);
      expect(expected.length).toBeGreaterThan(10);
      for (const t of expected) expect(tables).toContain(t);
    } finally {
      rootSql(`DROP DATABASE ${name}`);
    }
  });
});
