import Database from 'better-sqlite3';
import { sql } from 'drizzle-orm';
import { drizzle, type BetterSQLite3Database } from 'drizzle-orm/better-sqlite3';
import { migrate } from 'drizzle-orm/better-sqlite3/migrator';
import fs from 'node:fs';
import path from 'node:path';
import * as schema from './schema';

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

const MIGRATIONS = path.resolve(__dirname, '..', 'migrations');

/** Opens (creating if needed) a SQLite file, or ':memory:', with the pragmas every connection needs. */
export function openDb(file: string): Db {
  if (file !== ':memory:') fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma('journal_mode = WAL');
  // FULL: an acknowledged write survives power loss, which the audit trail and readings need.
  sqlite.pragma('synchronous = FULL');
  sqlite.pragma('busy_timeout = 5000');
  sqlite.pragma('foreign_keys = ON');
  return drizzle(sqlite, { schema }) as Db;
}

/** Applies the committed drizzle-kit migrations. */
export function migrateDb(db: Db): void {
  migrate(db, { migrationsFolder: MIGRATIONS });
}

/** Runs `fn` under a savepoint: if it throws, only its own writes are undone and the transaction carries on. */
export type Savepoint = <T>(fn: () => T) => T;

// better-sqlite3 turns a transaction function called inside a transaction into a savepoint, with its statements
// prepared once per connection.
const savepoints = new WeakMap<Database.Database, Savepoint>();
function savepointOf(client: Database.Database): Savepoint {
  let sp = savepoints.get(client);
  if (!sp) savepoints.set(client, (sp = client.transaction((fn: () => unknown) => fn()) as unknown as Savepoint));
  return sp;
}

/**
 * Runs a write as one BEGIN IMMEDIATE transaction: it takes the write lock up front, so concurrent writers queue
 * on busy_timeout instead of failing half-way with SQLITE_BUSY. Synchronous: an async callback would commit early.
 * `savepoint` lets one item of a group commit fail alone.
 */
export function writeTx<T>(db: Db, fn: (tx: Db, savepoint: Savepoint) => T): T {
  const savepoint: Savepoint = (inner) => savepointOf(db.$client)(inner);
  return db.transaction((tx) => fn(tx as unknown as Db, savepoint), { behavior: 'immediate' });
}

/**
 * Memoises a drizzle prepared query per connection handle, and per variant when the SQL itself differs (which
 * optional filters are present, the sort order). Building the SQL on every call cost more than running it on the
 * hot paths (session check, list reads; profiled under `npm run load`). A transaction handle is a different
 * object, so it prepares its own on first use.
 */
export function preparedPer<T, V = void>(build: (db: Db, variant: V) => T): (db: Db, variant: V) => T {
  const cache = new WeakMap<Db, Map<string | undefined, T>>();
  return (db, variant) => {
    let byVariant = cache.get(db);
    if (!byVariant) cache.set(db, (byVariant = new Map()));
    const key = variant === undefined ? undefined : JSON.stringify(variant);
    let q = byVariant.get(key);
    if (q === undefined) byVariant.set(key, (q = build(db, variant)));
    return q;
  };
}

/** A prepared insert's values: a placeholder named after each column. */
export const columnPlaceholders = (columns: readonly string[]) => Object.fromEntries(columns.map((c) => [c, sql.placeholder(c)]));

/** A row as the values bound to those placeholders (a missing value is NULL). */
export const boundRow = <C extends string>(columns: readonly C[], row: Partial<Record<C, unknown>>) => Object.fromEntries(columns.map((c) => [c, row[c] ?? null]));
