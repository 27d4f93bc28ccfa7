import { defineConfig } from 'vitest/config';
import path from 'node:path';

// The API tests that hold on either database run a second time on PostgreSQL 15 (project `server-pg`). Left out
// there, each for what it tests: the SQLite file itself (locks, a full or read-only file, SIGKILL of the one
// process writing it, the online backup, the demo seed of a SQLite file), or no database at all.
const SQLITE_OR_NO_DATABASE = [
  'tests/server/unwritable.test.ts',
  'tests/server/crash.test.ts',
  'tests/server/backup.test.ts',
  'tests/server/seed.test.ts',
  'tests/server/csv-reader.test.ts',
  'tests/server/fair-turns.test.ts',
  'tests/server/accounts.test.ts',
  'tests/server/web-build.test.ts',
  'tests/server/web-runtime.test.ts',
  'tests/server/web-static.test.ts',
];

export default defineConfig({
  resolve: { alias: { '@': path.resolve(__dirname, 'src') } },
  test: {
    environment: 'node',
    testTimeout: 30_000,
    projects: [
      {
        extends: true,
        test: { name: 'sqlite', include: ['tests/**/*.test.ts'], exclude: ['tests/e2e/**', 'tests/pg/**', 'node_modules/**'] },
      },
      {
        extends: true,
        test: {
          name: 'server-pg',
          // tests/pg: what only PostgreSQL promises (several server processes on one database).
          include: ['tests/server/**/*.test.ts', 'tests/pg/**/*.test.ts'],
          exclude: SQLITE_OR_NO_DATABASE,
          // Read by db/tables.ts when a worker starts: the queries bind to the PostgreSQL tables. Each test app then
          // opens a database of its own in the run's cluster (tests/support/pg-global-setup.ts).
          env: { DATABASE_URL: 'postgres://test-cluster/per-test' },
          globalSetup: ['tests/support/pg-global-setup.ts'],
          hookTimeout: 60_000,
        },
      },
    ],
  },
});
