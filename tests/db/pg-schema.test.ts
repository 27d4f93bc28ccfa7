import { getTableColumns, is, SQL } from 'drizzle-orm';
import { getTableConfig as pgTableConfig, PgDialect, PgTable, type PgColumn } from 'drizzle-orm/pg-core';
import { getTableConfig as sqliteTableConfig, SQLiteSyncDialect, SQLiteTable, type SQLiteColumn } from 'drizzle-orm/sqlite-core';
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateDb, openDb, sqliteClient } from '../../db/client';
import { migratePg, openPg, type PgDb } from '../../db/pg/client';
import { PG_SCHEMA_FILE, PG_SQL_DEFAULTS, renderPgSchema } from '../../db/pg/generate-schema';
import * as pgSchema from '../../db/pg/schema';
import * as sqliteSchema from '../../db/tables';
import { startPostgres, type TestPostgres } from '../support/postgres';

// Compile-time: every table reads and writes the same row type in both dialects (`npm run typecheck` fails if not).
// Writes compare as Required: SQLite lets an insert omit an INTEGER PRIMARY KEY that is a reference (the rowid would
// fill it; the code always writes it), PostgreSQL rightly does not. Which columns have defaults is checked below.
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
type PgTables = typeof pgSchema;
type SqliteTables = { [K in keyof PgTables]: K extends keyof typeof sqliteSchema ? (typeof sqliteSchema)[K] : never };
const sameRows: {
  [K in keyof PgTables]: [
    Same<PgTables[K]['$inferSelect'], SqliteTables[K]['$inferSelect']>,
    Same<Required<PgTables[K]['$inferInsert']>, Required<SqliteTables[K]['$inferInsert']>>,
  ];
} = Object.fromEntries(Object.keys(pgSchema).map((k) => [k, [true, true]])) as Record<keyof PgTables, [true, true]>;

const sqliteTables = Object.entries(sqliteSchema as Record<string, unknown>).filter((e): e is [string, SQLiteTable] => is(e[1], SQLiteTable));
const pgTables = Object.entries(pgSchema as Record<string, unknown>).filter((e): e is [string, PgTable] => is(e[1], PgTable));

// The dialect mapping this test holds the generator to, written independently of it: SQLite INTEGER is 64-bit
// (bigint), REAL is a double, JSON stays text-exact (json, not jsonb, which reorders keys).
const PG_TYPE_OF: Record<string, string> = {
  SQLiteInteger: 'PgBigInt53',
  SQLiteBoolean: 'PgBoolean',
  SQLiteReal: 'PgDoublePrecision',
  SQLiteText: 'PgText',
  SQLiteTextJson: 'PgJson',
};

const sqliteSql = new SQLiteSyncDialect();
const pgSql = new PgDialect();
const defaultOf = (c: SQLiteColumn | PgColumn, dialect: 'sqlite' | 'pg') => {
  if (!c.hasDefault) return { none: true };
  if (is(c.default, SQL)) {
    const text = dialect === 'sqlite' ? sqliteSql.sqlToQuery(c.default).sql : pgSql.sqlToQuery(c.default).sql;
    return { sql: dialect === 'sqlite' ? (PG_SQL_DEFAULTS[text] ?? `unmapped: ${text}`) : text };
  }
  return { value: c.default };
};

/** One table as both dialects can describe it, from Drizzle's own table config. */
function describeTable(table: SQLiteTable | PgTable) {
  const isSqlite = is(table, SQLiteTable);
  const cfg = isSqlite ? sqliteTableConfig(table) : pgTableConfig(table as PgTable);
  const nameOf = (t: SQLiteTable | PgTable) => (is(t, SQLiteTable) ? sqliteTableConfig(t).name : pgTableConfig(t as PgTable).name);
  return {
    name: cfg.name,
    columns: Object.entries(getTableColumns(table)).map(([key, col]) => {
      const c = col as SQLiteColumn | PgColumn;
      const autoIncrement = isSqlite ? Boolean((c as { autoIncrement?: boolean }).autoIncrement) : (c as PgColumn).generatedIdentity?.type === 'byDefault';
      // SQLite's INTEGER PRIMARY KEY reports a default (the rowid; with AUTOINCREMENT, never reused): identity's
      // part in PostgreSQL, compared as autoIncrement. Without AUTOINCREMENT it is a reference (site_id), always written.
      const rowidDefault = isSqlite && c.primary && c.columnType === 'SQLiteInteger' && c.default === undefined;
      return {
        key,
        name: c.name,
        type: isSqlite ? (PG_TYPE_OF[c.columnType] ?? `unmapped ${c.columnType}`) : c.columnType,
        notNull: c.notNull,
        primary: c.primary,
        autoIncrement,
        default: autoIncrement || rowidDefault ? { none: true } : defaultOf(c, isSqlite ? 'sqlite' : 'pg'),
        enumValues: c.enumValues ?? null,
      };
    }),
    indexes: cfg.indexes
      .map((i) => ({
        name: i.config.name,
        unique: i.config.unique,
        columns: i.config.columns.map((c) => (c as { name: string }).name),
        where: i.config.where ? 'partial' : null,
      }))
      .sort((a, b) => a.name!.localeCompare(b.name!)),
    foreignKeys: cfg.foreignKeys
      .map((f) => {
        const r = f.reference();
        return {
          columns: r.columns.map((c) => c.name),
          table: nameOf(r.foreignTable as SQLiteTable | PgTable),
          foreignColumns: r.foreignColumns.map((c) => c.name),
          onDelete: f.onDelete ?? 'no action',
          onUpdate: f.onUpdate ?? 'no action',
        };
      })
      .sort((a, b) => a.columns.join().localeCompare(b.columns.join())),
    uniqueConstraints: cfg.uniqueConstraints.map((u) => u.columns.map((c) => c.name)),
    primaryKeys: cfg.primaryKeys.map((p) => p.columns.map((c) => c.name)),
    checks: cfg.checks.map((c) => c.name),
  };
}

describe('PostgreSQL schema: one definition of each table', () => {
  it('db/pg/schema.ts is what the generator writes from db/schema/ now (else: npm run db:generate:pg)', () => {
    expect(fs.readFileSync(PG_SCHEMA_FILE, 'utf8')).toBe(renderPgSchema());
  });

  it('has the same tables under the same names and row types as the SQLite schema', () => {
    expect(pgTables.map(([k]) => k).sort()).toEqual(sqliteTables.map(([k]) => k).sort());
    expect(Object.keys(sameRows).sort()).toEqual(pgTables.map(([k]) => k).sort());
    expect(sqliteTables.length).toBeGreaterThan(20);
  });

  it.each(sqliteTables.map(([k, t]) => [k, t] as const))(
    '%s: columns, types, nullability, defaults, indexes, foreign keys, unique and checks match',
    (key, table) => {
      const pgTable = (pgSchema as Record<string, PgTable>)[key]!;
      expect(describeTable(pgTable)).toEqual(describeTable(table));
    },
  );

  it('maps every SQL default, and a table the generator cannot map fails loudly', () => {
    for (const [, table] of sqliteTables) for (const c of describeTable(table).columns) expect(JSON.stringify(c.default)).not.toContain('unmapped');
  });
});

// The committed migrations of each dialect, applied to a real database, give the same catalog.
describe('PostgreSQL 15 migrations against the SQLite ones (a real server started by the test)', () => {
  let server: TestPostgres;
  let db: PgDb;
  beforeAll(async () => {
    server = await startPostgres();
    db = openPg(await server.createDatabase('schema'));
    await migratePg(db);
  }, 60_000);
  afterAll(async () => {
    await db?.$client.end();
    await server?.stop();
  });

  const affinity: Record<string, string> = { bigint: 'INTEGER', boolean: 'INTEGER', 'double precision': 'REAL', text: 'TEXT', json: 'TEXT' };
  const normaliseDefault = (d: string | null) => {
    if (d === null) return null;
    if (/strftime\('%Y-%m-%dT%H:%M:%fZ'/.test(d) || /^to_char\(\(now\(\) AT TIME ZONE 'UTC'::text\), 'YYYY-MM-DD"T"HH24:MI:SS\.MS"Z"'::text\)$/.test(d))
      return 'now as ISO-8601 UTC with ms';
    return d
      .replace(/::text$/, '')
      .replace(/^'(.*)'$/, '$1')
      .replace(/^true$/, '1')
      .replace(/^false$/, '0');
  };

  async function pgCatalog() {
    const q = async <T>(text: string) => (await db.$client.query(text)).rows as T[];
    const cols = await q<{
      table_name: string;
      column_name: string;
      data_type: string;
      is_nullable: string;
      column_default: string | null;
      is_identity: string;
    }>(
      `select table_name, column_name, data_type, is_nullable, column_default, is_identity from information_schema.columns where table_schema = 'public' order by table_name, ordinal_position`,
    );
    const pks = await q<{ table_name: string; column_name: string }>(
      `select k.table_name, k.column_name from information_schema.table_constraints c join information_schema.key_column_usage k using (constraint_schema, constraint_name) where c.constraint_type = 'PRIMARY KEY' and c.table_schema = 'public'`,
    );
    const idx = await q<{ table: string; name: string; unique: boolean; columns: string[] }>(
      `select t.relname as table, i.relname as name, ix.indisunique as unique,
         array(select a.attname::text from unnest(ix.indkey) with ordinality k(attnum, ord) join pg_attribute a on a.attrelid = t.oid and a.attnum = k.attnum order by k.ord) as columns
       from pg_index ix join pg_class i on i.oid = ix.indexrelid join pg_class t on t.oid = ix.indrelid join pg_namespace n on n.oid = t.relnamespace
       where n.nspname = 'public' and not ix.indisprimary`,
    );
    const fks = await q<{ table: string; ref: string; cols: string[]; refcols: string[]; del: string; upd: string }>(
      `select c.conrelid::regclass::text as table, c.confrelid::regclass::text as ref,
         array(select a.attname::text from unnest(c.conkey) with ordinality k(n, o) join pg_attribute a on a.attrelid = c.conrelid and a.attnum = k.n order by k.o) as cols,
         array(select a.attname::text from unnest(c.confkey) with ordinality k(n, o) join pg_attribute a on a.attrelid = c.confrelid and a.attnum = k.n order by k.o) as refcols,
         c.confdeltype as del, c.confupdtype as upd
       from pg_constraint c join pg_namespace n on n.oid = c.connamespace where c.contype = 'f' and n.nspname = 'public'`,
    );
    const action: Record<string, string> = { a: 'NO ACTION', r: 'RESTRICT', c: 'CASCADE', n: 'SET NULL', d: 'SET DEFAULT' };
    const tables = [...new Set(cols.map((c) => c.table_name))].sort();
    return Object.fromEntries(
      tables.map((t) => [
        t,
        {
          columns: cols
            .filter((c) => c.table_name === t)
            .sort((a, b) => a.column_name.localeCompare(b.column_name))
            .map((c) => ({
              name: c.column_name,
              type: affinity[c.data_type] ?? c.data_type,
              notNull: c.is_nullable === 'NO',
              primaryKey: pks.some((p) => p.table_name === t && p.column_name === c.column_name),
              autoIncrement: c.is_identity === 'YES',
              default: normaliseDefault(c.column_default),
            })),
          indexes: idx
            .filter((i) => i.table === t)
            .map((i) => ({ name: i.name, unique: i.unique, columns: i.columns }))
            .sort((a, b) => a.name.localeCompare(b.name)),
          foreignKeys: fks
            .filter((f) => f.table === t)
            .map((f) => ({ columns: f.cols, table: f.ref, foreignColumns: f.refcols, onDelete: action[f.del], onUpdate: action[f.upd] }))
            .sort((a, b) => a.columns.join().localeCompare(b.columns.join())),
        },
      ]),
    );
  }

  async function sqliteCatalog() {
    const s = openDb(':memory:');
    await migrateDb(s);
    const c = sqliteClient(s);
    const tables = c
      .prepare(`select name, sql from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like '__drizzle%' order by name`)
      .all() as { name: string; sql: string }[];
    const out = Object.fromEntries(
      tables.map(({ name: t, sql }) => [
        t,
        {
          // By name: a column added later by ALTER TABLE sits last in SQLite and in its place in PostgreSQL.
          columns: (c.pragma(`table_info("${t}")`) as { name: string; type: string; notnull: number; dflt_value: string | null; pk: number }[])
            .sort((a, b) => a.name.localeCompare(b.name))
            .map((col) => ({
              name: col.name,
              type: col.type,
              notNull: col.notnull === 1 || col.pk > 0,
              primaryKey: col.pk > 0,
              autoIncrement: col.pk > 0 && new RegExp(`[\`"]${col.name}[\`"] integer PRIMARY KEY AUTOINCREMENT`, 'i').test(sql),
              default: normaliseDefault(col.dflt_value),
            })),
          indexes: (c.pragma(`index_list("${t}")`) as { name: string; unique: number; origin: string }[])
            .filter((i) => i.origin !== 'pk')
            .map((i) => ({ name: i.name, unique: i.unique === 1, columns: (c.pragma(`index_info("${i.name}")`) as { name: string }[]).map((x) => x.name) }))
            .sort((a, b) => a.name.localeCompare(b.name)),
          foreignKeys: (c.pragma(`foreign_key_list("${t}")`) as { table: string; from: string; to: string; on_delete: string; on_update: string }[])
            .map((f) => ({ columns: [f.from], table: f.table, foreignColumns: [f.to], onDelete: f.on_delete, onUpdate: f.on_update }))
            .sort((a, b) => a.columns.join().localeCompare(b.columns.join())),
        },
      ]),
    );
    c.close();
    return out;
  }

  it('has the same tables, columns, types, nullability, keys, defaults, indexes and foreign keys', async () => {
    const [pgSide, sqliteSide] = [await pgCatalog(), await sqliteCatalog()];
    expect(Object.keys(pgSide).length).toBeGreaterThan(20);
    expect(pgSide).toEqual(sqliteSide);
  });

  it("writes created_at by default in SQLite's exact format", async () => {
    const [{ created_at: at }] = (await db.$client.query(`insert into sites (name) values ('Default check') returning created_at`)).rows;
    const s = openDb(':memory:');
    await migrateDb(s);
    const { created_at: sqliteAt } = sqliteClient(s).prepare(`insert into sites (name) values ('Default check') returning created_at`).get() as {
      created_at: string;
    };
    sqliteClient(s).close();
    const iso = /^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/;
    expect(sqliteAt).toMatch(iso);
    expect(at).toMatch(iso);
    expect(Math.abs(Date.parse(at) - Date.now())).toBeLessThan(60_000);
  });
});
