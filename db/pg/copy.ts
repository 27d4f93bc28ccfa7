import Database from 'better-sqlite3';
import { getTableColumns, is } from 'drizzle-orm';
import { getTableConfig, SQLiteTable, type SQLiteColumn } from 'drizzle-orm/sqlite-core';
import { parseArgs } from 'node:util';
import * as sqlite from '../schema';
import { migratePg, openPg } from './client';

export type CopyReport = { tables: { name: string; rows: number }[]; ms: number };

/** The tables of db/schema/ in foreign-key order: every table after the tables it references. */
export function tablesInForeignKeyOrder(): SQLiteTable[] {
  const tables = Object.values(sqlite as Record<string, unknown>).filter((t): t is SQLiteTable => is(t, SQLiteTable));
  tables.sort((a, b) => getTableConfig(a).name.localeCompare(getTableConfig(b).name));
  const out: SQLiteTable[] = [];
  const state = new Map<SQLiteTable, 'visiting' | 'done'>();
  const visit = (t: SQLiteTable) => {
    if (state.get(t) === 'done') return;
    if (state.get(t) === 'visiting') throw new Error(`foreign keys form a cycle through ${getTableConfig(t).name}`);
    state.set(t, 'visiting');
    for (const fk of getTableConfig(t).foreignKeys) {
      const target = fk.reference().foreignTable as SQLiteTable;
      if (target !== t) visit(target);
    }
    state.set(t, 'done');
    out.push(t);
  };
  tables.forEach(visit);
  return out;
}

// PostgreSQL's limit is 65,535 parameters per statement.
const MAX_PARAMS = 60_000;

/**
 * Copies a whole SQLite installation into an empty PostgreSQL database: migrates the target, then every table in
 * foreign-key order inside ONE transaction (all or nothing), values as stored (JSON text unchanged, 64-bit
 * integers exact), and moves each identity sequence past its table's largest id. Reads the source in one read
 * transaction, so a server still writing to it cannot tear the copy. Refuses a target that holds any row.
 */
export async function copySqliteToPg(from: string, to: string, log: (line: string) => void = () => {}): Promise<CopyReport> {
  const t0 = performance.now();
  const src = new Database(from, { readonly: true, fileMustExist: true });
  const db = openPg(to, { max: 1 });
  try {
    const tables = tablesInForeignKeyOrder();
    const existing = new Set(
      ((await db.$client.query(`select table_name from information_schema.tables where table_schema = 'public'`)).rows as { table_name: string }[]).map(
        (r) => r.table_name,
      ),
    );
    const holding: string[] = [];
    for (const t of tables) {
      const name = getTableConfig(t).name;
      if (!existing.has(name)) continue;
      const { rows } = await db.$client.query(`select count(*) as n from "${name}"`);
      if (rows[0].n > 0) holding.push(`${name} (${rows[0].n})`);
    }
    if (holding.length)
      throw new Error(
        `Refusing to copy: the target database already holds data in ${holding.join(', ')}. db:copy fills only an empty database; create a new one (createdb) or empty this one first.`,
      );
    await migratePg(db);

    src.exec('begin'); // one read snapshot of the source for the whole copy
    const client = await db.$client.connect();
    const report: CopyReport['tables'] = [];
    try {
      await client.query('begin');
      for (const t of tables) {
        const name = getTableConfig(t).name;
        const cols = Object.values(getTableColumns(t)) as SQLiteColumn[];
        const srcCols = new Set((src.pragma(`table_info("${name}")`) as { name: string }[]).map((c) => c.name));
        const missing = cols.filter((c) => !srcCols.has(c.name)).map((c) => c.name);
        if (!srcCols.size) throw new Error(`The source has no table ${name}: start the server on it once (it migrates) before copying`);
        if (missing.length) throw new Error(`The source's ${name} lacks ${missing.join(', ')}: start the server on it once (it migrates) before copying`);
        const stmt = src
          .prepare(`select ${cols.map((c) => `"${c.name}"`).join(', ')} from "${name}" order by rowid`)
          .raw(true)
          .safeIntegers(true);
        const convert = cols.map((c) =>
          c.columnType === 'SQLiteBoolean'
            ? (v: unknown) => {
                if (v === null) return null;
                if (v !== 0n && v !== 1n) throw new Error(`${name}.${c.name} holds ${String(v)}, not a boolean`);
                return v === 1n;
              }
            : (v: unknown) => (typeof v === 'bigint' ? v.toString() : v),
        );
        const perStatement = Math.max(1, Math.floor(MAX_PARAMS / cols.length));
        const head = `insert into "${name}" (${cols.map((c) => `"${c.name}"`).join(', ')}) values `;
        let batch: unknown[][] = [];
        let rows = 0;
        const flush = async () => {
          if (!batch.length) return;
          const params: unknown[] = [];
          const tuples = batch.map((r) => `(${r.map((v, i) => (params.push(convert[i]!(v)), `$${params.length}`)).join(', ')})`);
          await client.query(head + tuples.join(', '), params);
          rows += batch.length;
          batch = [];
        };
        for (const row of stmt.iterate() as Iterable<unknown[]>) {
          batch.push(row);
          if (batch.length === perStatement) await flush();
        }
        await flush();
        for (const c of cols.filter((c) => (c as { autoIncrement?: boolean }).autoIncrement)) {
          await client.query(
            `select setval(pg_get_serial_sequence('"${name}"', '${c.name}'), coalesce((select max("${c.name}") from "${name}"), 0) + 1, false)`,
          );
        }
        report.push({ name, rows });
        log(`${name}: ${rows} rows`);
      }
      await client.query('commit');
    } catch (err) {
      await client.query('rollback').catch(() => {});
      throw err;
    } finally {
      client.release();
      src.exec('commit');
    }
    return { tables: report, ms: performance.now() - t0 };
  } finally {
    src.close();
    await db.$client.end();
  }
}

// npm run db:copy -- --from data/yieldpoint.db --to postgres://user@host/db
if (require.main === module) {
  const { values } = parseArgs({ options: { from: { type: 'string' }, to: { type: 'string' } } });
  if (!values.from || !values.to) {
    console.error('usage: npm run db:copy -- --from <sqlite file> --to <postgres url>');
    process.exit(2);
  }
  copySqliteToPg(values.from, values.to, console.log)
    .then((r) => {
      const total = r.tables.reduce((a, t) => a + t.rows, 0);
      console.log(`Copied ${total} rows in ${r.tables.length} tables in ${(r.ms / 1000).toFixed(1)} s, in one transaction.`);
      console.log(
        'The installation files beside the SQLite file (.audit-key, audit-checkpoints.jsonl, .session-secret, .webhook-secret, files/, pki/) are not in the database: keep them with the server that uses the copy, or its audit chain verifies as broken.',
      );
    })
    .catch((err) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    });
}
