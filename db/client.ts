import Database from 'better-sqlite3';
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
 * Memoises a drizzle prepared query per connection handle. Building the SQL on every call cost more than running
 * it on the hot paths (session check, list reads; profiled under `npm run load`). A transaction handle is a
 * different object, so it prepares its own on first use.
 */
export function preparedPer<T>(build: (db: Db) => T): (db: Db) => T {
  const cache = new WeakMap<Db, T>();
  return (db) => {
    let q = cache.get(db);
    if (q === undefined) cache.set(db, (q = build(db)));
    return q;
  };
}

