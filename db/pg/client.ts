import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import path from 'node:path';
import pg from 'pg';
import { adoptPg, type Db } from '../client';
import { databaseDialect } from '../tables';
import * as schema from './schema';
import { watchSessionTables } from './session-watch';

export type PgDb = NodePgDatabase<typeof schema> & { $client: pg.Pool };

const MIGRATIONS = path.resolve(__dirname, '..', '..', 'migrations', 'pg');
const INT8 = 20;

// SQLite hands INTEGER to JavaScript as a number; node-postgres hands int8 (bigint, count(*)) as a string by
// default. A number here too, refused past 2^53 rather than rounded.
function parseInt8(text: string): number {
  const n = Number(text);
  if (!Number.isSafeInteger(n)) throw new RangeError(`int8 value ${text} is beyond JavaScript's exact integers`);
  return n;
}
const types = {
  getTypeParser: ((oid: number, format?: 'text' | 'binary') =>
    oid === INT8 && format !== 'binary' ? parseInt8 : pg.types.getTypeParser(oid, format)) as typeof pg.types.getTypeParser,
};

/** A pool on a PostgreSQL database (`postgres://...`) with Drizzle over the generated schema. */
export function openPg(url: string, opts: { max?: number } = {}): PgDb {
  const pool = new pg.Pool({ connectionString: url, max: opts.max ?? 10, types });
  return drizzle(pool, { schema }) as PgDb;
}

/** Applies the committed drizzle-kit migrations for PostgreSQL (migrations/pg). */
export async function migratePg(db: PgDb): Promise<void> {
  await migrate(db, { migrationsFolder: MIGRATIONS });
}

/**
 * The product's database handle on PostgreSQL: the pool with Drizzle over the generated schema, registered with
 * the folder of the installation's files. The process must run on PostgreSQL (DATABASE_URL set before start), so
 * its queries use the PostgreSQL tables (db/tables.ts).
 */
export async function openPgDb(url: string, opts: { dataDir: string | null; max?: number }): Promise<Db> {
  if (databaseDialect !== 'postgres') throw new Error('Set DATABASE_URL before the process starts: its queries were bound to the SQLite tables');
  const db = openPg(url, { max: opts.max });
  // A dropped idle connection is replaced on the next query; without a listener its error would end the process.
  db.$client.on('error', (err) => console.error(`[${new Date().toISOString()}] PostgreSQL connection lost: ${err.message}`));
  return adoptPg(db as unknown as Db, opts.dataDir, watchSessionTables(url));
}

/** migratePg for the product's handle. */
export const migratePgDb = (db: Db) => migratePg(db as unknown as PgDb);
