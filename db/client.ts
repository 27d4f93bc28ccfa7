import Database from 'better-sqlite3';
import { sql } from 'drizzle-orm';
import { drizzle, type BetterSQLite3Database } from 'drizzle-orm/better-sqlite3';
import { migrate } from 'drizzle-orm/better-sqlite3/migrator';
import fs from 'node:fs';
import path from 'node:path';
import * as schema from './schema';

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

const MIGRATIONS = path.resolve(__dirname, '..', 'migrations');
// How long a write waits for another connection's lock before the database counts as not writable.
const BUSY_TIMEOUT_MS = 5000;

/** Opens (creating if needed) a SQLite file, or ':memory:', with the pragmas every connection needs. */
export function openDb(file: string): Db {
  if (file !== ':memory:') fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma('journal_mode = WAL');
  // FULL: an acknowledged write survives power loss, which the audit trail and readings need.
  sqlite.pragma('synchronous = FULL');
  sqlite.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
  sqlite.pragma('foreign_keys = ON');
  return drizzle(sqlite, { schema }) as Db;
}

/** The SQLite connection behind a handle; a transaction handle (inside writeTx) reaches it through its session. */
export const clientOf = (db: Db): Database.Database => db.$client ?? (db as unknown as { session: { client: Database.Database } }).session.client;

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

/** Why the database file cannot take a write just now. */
export type UnwritableReason = 'locked' | 'full' | 'read-only' | 'io';

/** A write refused because the file cannot be written (nothing was changed); the error middleware answers 503. */
export class DatabaseUnwritable extends Error {
  constructor(
    readonly reason: UnwritableReason,
    readonly sqliteCode: string,
  ) {
    super(`database not writable (${reason}, ${sqliteCode})`);
  }
}

// SQLite's result codes for a file that cannot be written now, as opposed to a write the data refuses
// (SQLITE_CONSTRAINT and the like stay errors of the request).
export function unwritableReason(err: unknown): UnwritableReason | null {
  const code = (err as { code?: unknown })?.code;
  if (typeof code !== 'string') return null;
  if (/^SQLITE_(BUSY|LOCKED)/.test(code)) return 'locked';
  if (code === 'SQLITE_FULL') return 'full';
  if (/^SQLITE_(READONLY|PERM|CANTOPEN)/.test(code)) return 'read-only';
  if (/^SQLITE_IOERR/.test(code)) return 'io';
  return null;
}

// Per connection: did the last write fail because the file was not writable? While it did, each write tries once
// without waiting on busy_timeout, so a held lock costs every write a blocked event loop only the first time.
const failing = new WeakMap<Database.Database, UnwritableReason>();

/**
 * Runs a write as one BEGIN IMMEDIATE transaction: it takes the write lock up front, so concurrent writers queue
 * on busy_timeout instead of failing half-way with SQLITE_BUSY. Synchronous: an async callback would commit early.
 * `savepoint` lets one item of a group commit fail alone. A file that cannot be written (locked by another
 * process, full, read-only, I/O error) rolls the whole write back and throws DatabaseUnwritable; the first write
 * that succeeds afterwards clears that state by itself.
 */
export function writeTx<T>(db: Db, fn: (tx: Db, savepoint: Savepoint) => T): T {
  const client = db.$client;
  const wasFailing = failing.get(client);
  const savepoint: Savepoint = (inner) => savepointOf(client)(inner);
  if (wasFailing) client.pragma('busy_timeout = 0');
  try {
    // The transaction handle gets the connection as `$client` too, as the Db type promises (caches key on it).
    const result = db.transaction((tx) => fn(Object.assign(tx, { $client: client }) as unknown as Db, savepoint), { behavior: 'immediate' });
    if (wasFailing) {
      failing.delete(client);
      console.error(`[${new Date().toISOString()}] database writable again`);
    }
    return result;
  } catch (err) {
    const reason = unwritableReason(err);
    if (!reason) throw err;
    if (!wasFailing) console.error(`[${new Date().toISOString()}] database not writable (${reason}): ${(err as Error).message}`);
    failing.set(client, reason);
    throw new DatabaseUnwritable(reason, (err as { code: string }).code);
  } finally {
    if (wasFailing) client.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
  }
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
export const boundRow = <C extends string>(columns: readonly C[], row: Partial<Record<C, unknown>>) =>
  Object.fromEntries(columns.map((c) => [c, row[c] ?? null]));
