import Database from 'better-sqlite3';
import { sql } from 'drizzle-orm';
import { drizzle } from 'drizzle-orm/better-sqlite3';
import { migrate } from 'drizzle-orm/better-sqlite3/migrator';
import type { NodePgDatabase } from 'drizzle-orm/node-postgres';
import fs from 'node:fs';
import path from 'node:path';
import { drizzle as drizzlePg } from 'drizzle-orm/node-postgres';
import type pg from 'pg';
import type * as pgSchema from './pg/schema';
import type { SessionWatch } from './pg/session-watch';
import * as schema from './schema';
import { databaseDialect } from './tables';

/**
 * The database handle every repository and service takes. Queries are written once, typed with Drizzle's
 * PostgreSQL builder (awaited, `.execute()`, `.prepare(name)`: the calls both drivers share) over the tables of
 * db/tables.ts. On SQLite the same calls run on Drizzle's better-sqlite3 driver and SQLite's tables, whose rows
 * are the same (tests/db/pg-schema.test.ts); `sqliteOf` gives the SQLite connection where a path needs it.
 */
export type Db = NodePgDatabase<typeof pgSchema>;

const MIGRATIONS = path.resolve(__dirname, '..', 'migrations');
// How long a write waits for another connection's lock before the database counts as not writable.
const BUSY_TIMEOUT_MS = 5000;

/** Opens (creating if needed) a SQLite file, or ':memory:', with the pragmas every connection needs. */
export function openDb(file: string): Db {
  if (databaseDialect !== 'sqlite') throw new Error('This process runs on PostgreSQL (DATABASE_URL is set): it cannot open a SQLite file as its database');
  if (file !== ':memory:') fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma('journal_mode = WAL');
  // FULL: an acknowledged write survives power loss, which the audit trail and readings need.
  sqlite.pragma('synchronous = FULL');
  sqlite.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
  sqlite.pragma('foreign_keys = ON');
  return drizzle(sqlite, { schema }) as unknown as Db;
}

/** The SQLite connection behind a handle, or null on PostgreSQL. */
export function sqliteOf(db: Db): Database.Database | null {
  const client: unknown = (db as { $client?: unknown }).$client;
  return client instanceof Database ? client : null;
}

/** The SQLite connection behind a handle; throws on PostgreSQL (for SQLite-only tools: backup, scripts). */
export function sqliteClient(db: Db): Database.Database {
  const client = sqliteOf(db);
  if (!client) throw new Error('This needs the SQLite database; this installation runs on PostgreSQL');
  return client;
}

// PostgreSQL: what the process knows of each pool (where its installation files live), and the pool behind each
// write transaction's handle.
const pools = new WeakMap<object, { dataDir: string | null; watch: SessionWatch | null }>();
const txPool = new WeakMap<Db, object>();

/**
 * Registers a PostgreSQL handle made by db/pg/client.ts, with the folder of its installation files and the watch
 * on the tables a session check reads.
 */
export function adoptPg(db: Db, dataDir: string | null, watch: SessionWatch | null = null): Db {
  pools.set((db as unknown as { $client: object }).$client, { dataDir, watch });
  return db;
}

/**
 * The version of the tables a session check reads (see SessionWatch), or null where no such watch runs: on
 * SQLite (whose in-process reads cost less than keeping them) and on PostgreSQL while the process does not listen.
 */
export function sessionTablesVersion(db: Db): number | null {
  return sqliteOf(db) ? null : (pools.get(databaseOf(db))?.watch?.version() ?? null);
}

/**
 * What identifies the database behind a handle, the same object for the handle's write transactions: the SQLite
 * connection, or the PostgreSQL pool. Per-database caches key on it.
 */
export function databaseOf(db: Db): object {
  return sqliteOf(db) ?? txPool.get(db) ?? (db as unknown as { $client: object }).$client;
}

/** Whether the handle is inside a write transaction (whose reads may still be rolled back). */
export function inWriteTx(db: Db): boolean {
  const client = sqliteOf(db);
  return client ? client.inTransaction : txPool.has(db);
}

/**
 * The folder of the installation's own files (its secrets: `.audit-key`, `.session-secret`; the audit
 * checkpoints): beside the SQLite file, or DATA_DIR for PostgreSQL. Null for an in-memory database.
 */
export function installationDir(db: Db): string | null {
  const client = sqliteOf(db);
  if (client) return client.name && client.name !== ':memory:' ? path.dirname(path.resolve(client.name)) : null;
  return pools.get(databaseOf(db))?.dataDir ?? null;
}

/** Applies the committed drizzle-kit migrations. */
export async function migrateDb(db: Db): Promise<void> {
  migrate(db as unknown as Parameters<typeof migrate>[0], { migrationsFolder: MIGRATIONS });
}

/** Closes the connection (SQLite) or the pool and its watch (PostgreSQL). */
export async function closeDb(db: Db): Promise<void> {
  const client = sqliteOf(db);
  if (client) {
    client.close();
    return;
  }
  await pools.get(databaseOf(db))?.watch?.close();
  await (db as unknown as { $client: { end(): Promise<void> } }).$client.end();
}

/** The first row of a result, or undefined: `query.then(first)` where SQLite's `.get()` was. */
export const first = <T>(rows: T[]): T | undefined => rows[0];

/** The row an INSERT or UPDATE ... RETURNING gave back: `query.returning().then(returned)`. */
export const returned = <T>(rows: T[]): T => rows[0] as T;

/** Why the database cannot take a write just now. */
export type UnwritableReason = 'locked' | 'full' | 'read-only' | 'io';

/** A write refused because the database cannot take it now (nothing was changed); the error middleware answers 503. */
export class DatabaseUnwritable extends Error {
  constructor(
    readonly reason: UnwritableReason,
    readonly code: string,
  ) {
    super(`database not writable (${reason}, ${code})`);
  }
}

// The driver's error code, also when Drizzle wrapped the driver's error (DrizzleQueryError keeps it as `cause`).
const codeOf = (err: unknown): string | null => {
  for (let e = err as { code?: unknown; cause?: unknown } | undefined, depth = 0; e && depth < 4; e = e.cause as typeof e, depth++)
    if (typeof e.code === 'string') return e.code;
  return null;
};

// node-postgres (8.x, lib/client.js and pg-pool) reports a lost or unreachable server with these messages and no
// code; tests/pg/faults.test.ts stops a real server mid-write and fails if a new version words them otherwise.
const PG_CONNECTION_LOST =
  /^(Connection terminated|Client has encountered a connection error|Client was closed and is not queryable|timeout exceeded when trying to connect)/;

// The database cannot take a write now, as opposed to a write the data refuses (a constraint and the like stay
// errors of the request). SQLite's result codes; PostgreSQL's SQLSTATEs, node's socket errors and node-postgres's
// messages above.
export function unwritableReason(err: unknown): UnwritableReason | null {
  const code = codeOf(err);
  if (!code) {
    for (let e = err as { message?: unknown; cause?: unknown } | undefined, depth = 0; e && depth < 4; e = e.cause as typeof e, depth++)
      if (typeof e.message === 'string' && PG_CONNECTION_LOST.test(e.message)) return 'io';
    return null;
  }
  // A hot standby or a read-only session (25006), a full disk (53100), a server going down or refusing
  // connections (57P0x, connection errors: class 08), or no reachable server at all.
  if (code === '25006') return 'read-only';
  if (code === '53100') return 'full';
  if (/^(57P0|08)/.test(code) || /^(ECONNREFUSED|ECONNRESET|ETIMEDOUT|EHOSTUNREACH|ENOTFOUND|EPIPE)$/.test(code)) return 'io';
  if (/^SQLITE_(BUSY|LOCKED)/.test(code)) return 'locked';
  if (code === 'SQLITE_FULL') return 'full';
  if (/^SQLITE_(READONLY|PERM|CANTOPEN)/.test(code)) return 'read-only';
  if (/^SQLITE_IOERR/.test(code)) return 'io';
  return null;
}

const PG_SERIALIZATION_FAILURE = new Set(['40001', '40P01']);

/**
 * Whether an error inside a write transaction concerns the whole transaction, not the item that met it: the
 * database cannot be written, or PostgreSQL must run the transaction again (a serialization failure or a
 * deadlock; writeTx does). A group commit lets one item fail alone only for other errors.
 */
export function failsWholeTransaction(err: unknown): boolean {
  const code = codeOf(err);
  return unwritableReason(err) !== null || (code !== null && PG_SERIALIZATION_FAILURE.has(code));
}

// Per connection: did the last write fail because the file was not writable? While it did, each write tries once
// without waiting on busy_timeout, so a held lock costs every write a blocked event loop only the first time.
const failing = new WeakMap<Database.Database, UnwritableReason>();

type TxStatements = {
  begin: Database.Statement;
  commit: Database.Statement;
  rollback: Database.Statement;
};
const statements = new WeakMap<Database.Database, TxStatements>();
function txStatements(client: Database.Database): TxStatements {
  let s = statements.get(client);
  if (!s)
    statements.set(
      client,
      (s = {
        begin: client.prepare('begin immediate'),
        commit: client.prepare('commit'),
        rollback: client.prepare('rollback'),
      }),
    );
  return s;
}

// One write transaction at a time per SQLite connection: the next one starts when the previous one ended.
const queues = new WeakMap<Database.Database, Promise<unknown>>();

/**
 * Runs a write as one transaction and resolves once it committed.
 *
 * SQLite: BEGIN IMMEDIATE takes the write lock up front, so concurrent writers queue on busy_timeout instead of
 * failing half-way with SQLITE_BUSY. The connection is shared by every request of the process, so the callback
 * must not give the event loop a turn (await only the database: better-sqlite3 answers at once); one that does
 * is rolled back with an error, before another request could read its uncommitted rows. A file that cannot be
 * written (locked by another process, full, read-only, I/O error) rolls the whole write back and throws
 * DatabaseUnwritable; the first write that succeeds afterwards clears that state by itself.
 *
 * PostgreSQL: one SERIALIZABLE transaction on a connection of the pool; several server processes may write at once,
 * and a transaction that could not have run in some serial order with the others fails with 40001 (or a deadlock,
 * 40P01) and is run again from the start, up to PG_ATTEMPTS times with a short random wait. What SQLite's single
 * writer gave (a read-then-write never acts on a stale read: the audit chain's head, the seats left, a reading
 * key) holds the same way. So the callback must do nothing outside the database that a second run would repeat.
 */
export function writeTx<T>(db: Db, fn: (tx: Db) => Promise<T> | T): Promise<T> {
  const client = sqliteOf(db);
  if (!client) return pgWriteTx(db, fn);
  const previous = queues.get(client);
  const run = previous ? previous.then(() => sqliteTx(db, client, fn)) : sqliteTx(db, client, fn);
  const settled = run.then(
    () => undefined,
    () => undefined,
  );
  queues.set(client, settled);
  void settled.then(() => {
    if (queues.get(client) === settled) queues.delete(client);
  });
  return run;
}

const PG_ATTEMPTS = 12;

// The advisory lock every write transaction holds (any number: it only has to be the same in every process).
const PG_WRITE_LOCK = 0x59_50_57; // "YPW"

async function pgWriteTx<T>(db: Db, fn: (tx: Db) => Promise<T> | T): Promise<T> {
  const database = databaseOf(db);
  for (let attempt = 1; ; attempt++) {
    try {
      const result = await pgLocked(db, (one) =>
        one.transaction(
          async (tx) => {
            const handle = tx as unknown as Db;
            txPool.set(handle, database);
            return fn(handle);
          },
          { isolationLevel: 'serializable' },
        ),
      );
      // What this process just committed is visible to its next session check at once, not only once its own
      // notification comes back.
      pools.get(database)?.watch?.bump();
      return result;
    } catch (err) {
      const code = codeOf(err);
      if (code && PG_SERIALIZATION_FAILURE.has(code) && attempt < PG_ATTEMPTS) {
        // Up to about 5 ms, then doubling to about 0.3 s: the transactions it collided with finish meanwhile.
        await new Promise((r) => setTimeout(r, Math.random() * 5 * 2 ** Math.min(attempt - 1, 6)));
        continue;
      }
      const reason = unwritableReason(err);
      if (reason) throw new DatabaseUnwritable(reason, code ?? 'connection-lost');
      throw err;
    }
  }
}

/**
 * Runs `fn` on one connection of the pool while it holds the installation's write lock (a session advisory lock,
 * taken before BEGIN so the transaction's snapshot is taken after it): the write transactions of every process
 * take turns, as SQLite's writers do, and seldom have to run again. Reads never wait for it. A process that dies
 * holding it loses its connection, and PostgreSQL lets the lock go with it.
 */
async function pgLocked<T>(db: Db, fn: (one: Db) => Promise<T>): Promise<T> {
  const pool = (db as unknown as { $client: pg.Pool }).$client;
  const client = await pool.connect();
  let broken: Error | undefined;
  // A checked-out client has no listener of the pool's: without this, a server lost between two statements
  // would end the process with an unhandled 'error' (tests/pg/faults.test.ts).
  const lost = (err: Error) => (broken = err);
  client.on('error', lost);
  try {
    await client.query('select pg_advisory_lock($1)', [PG_WRITE_LOCK]);
    try {
      // No schema: the transaction runs builder queries only, so nothing is derived from the tables per write.
      return await fn(drizzlePg(client) as unknown as Db);
    } finally {
      await client.query('select pg_advisory_unlock($1)', [PG_WRITE_LOCK]).catch((e: Error) => (broken = e));
    }
  } catch (err) {
    broken ??= unwritableReason(err) ? (err as Error) : undefined;
    throw err;
  } finally {
    // A connection that failed mid-way is not handed out again.
    client.off('error', lost);
    client.release(broken);
  }
}

async function sqliteTx<T>(db: Db, client: Database.Database, fn: (tx: Db) => Promise<T> | T): Promise<T> {
  const st = txStatements(client);
  const wasFailing = failing.get(client);
  if (wasFailing) client.pragma('busy_timeout = 0');
  let turned = false;
  const sentinel = setImmediate(() => (turned = true));
  try {
    st.begin.run();
    let result: T;
    try {
      result = await fn(db);
      if (turned) throw new Error('writeTx: the transaction gave the event loop a turn before it committed; a write transaction may await only the database');
      st.commit.run();
    } catch (err) {
      if (client.inTransaction) st.rollback.run();
      throw err;
    }
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
    throw new DatabaseUnwritable(reason, codeOf(err)!);
  } finally {
    clearImmediate(sentinel);
    if (wasFailing) client.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
  }
}

/**
 * Memoises a drizzle prepared query per connection handle, and per variant when the SQL itself differs (which
 * optional filters are present, the sort order). Building the SQL on every call cost more than running it on the
 * hot paths (session check, list reads; profiled under `npm run load`). `build` gets the statement's name, one
 * per query and variant (PostgreSQL keeps named statements per connection; SQLite ignores the name).
 */
let preparedCount = 0;
export function preparedPer<T, V = void>(build: (db: Db, variant: V, name: string) => T): (db: Db, variant: V) => T {
  const cache = new WeakMap<Db, Map<string | undefined, T>>();
  const id = ++preparedCount;
  // Names are shared by every handle: one SQL text per name on any PostgreSQL connection.
  const names = new Map<string | undefined, string>();
  const nameOf = (key: string | undefined) => {
    let name = names.get(key);
    if (name === undefined) names.set(key, (name = `yp_q${id}_${names.size}`));
    return name;
  };
  return (db, variant) => {
    let byVariant = cache.get(db);
    if (!byVariant) cache.set(db, (byVariant = new Map()));
    const key = variant === undefined ? undefined : JSON.stringify(variant);
    let q = byVariant.get(key);
    if (q === undefined) byVariant.set(key, (q = build(db, variant, nameOf(key))));
    return q;
  };
}

/** A prepared insert's values: a placeholder named after each column. */
export const columnPlaceholders = (columns: readonly string[]) => Object.fromEntries(columns.map((c) => [c, sql.placeholder(c)]));

/** A row as the values bound to those placeholders (a missing value is NULL). */
export const boundRow = <C extends string>(columns: readonly C[], row: Partial<Record<C, unknown>>) =>
  Object.fromEntries(columns.map((c) => [c, row[c] ?? null]));
