// Vitest: unit, integration (real MariaDB, S3 stand-in, mail catcher) and browser tests.
// Run through `npm test`, which starts the services and passes their addresses in the environment.
import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

export default defineConfig({
  resolve: { alias: { '~': fileURLToPath(new URL('../src', import.meta.url)) } },
  test: {
    root: fileURLToPath(new URL('..', import.meta.url)),
    include: ['tests/**/*.test.{ts,tsx}'],
    setupFiles: ['tests/support/yield-between-tests.ts', 'tests/support/solver-threads.ts'],
    pool: 'forks',
    poolOptions: { forks: { maxForks: 2, minForks: 1 } },
    testTimeout: 60_000,
    hookTimeout: 120_000,
    reporters: ['default'],
  },
});
