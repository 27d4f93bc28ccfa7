import { getTableColumns, is, SQL } from 'drizzle-orm';
import { getTableConfig, SQLiteSyncDialect, SQLiteTable, type SQLiteColumn } from 'drizzle-orm/sqlite-core';
import fs from 'node:fs';
import path from 'node:path';
import * as sqlite from '../schema';

// Writes db/pg/schema.ts, the PostgreSQL form of every table in db/schema/, read from Drizzle's own table config:
// db/schema/ stays the one definition and this file is output (npm run db:generate:pg; a test fails when stale).
export const PG_SCHEMA_FILE = path.join(__dirname, 'schema.ts');

/**
 * SQL defaults have no dialect-free form: each one written in db/schema/ needs its PostgreSQL twin here.
 * created_at: an ISO-8601 UTC string with milliseconds, as SQLite's strftime('%Y-%m-%dT%H:%M:%fZ') writes it.
 */
export const PG_SQL_DEFAULTS: Record<string, string> = {
  "(strftime('%Y-%m-%dT%H:%M:%fZ','now'))": `(to_char(now() at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'))`,
};

const sqliteSql = new SQLiteSyncDialect();
const q = (s: string) => `'${s.replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;

type TableEntry = { exportName: string; table: SQLiteTable };
const tablesOf = (mod: Record<string, unknown>): TableEntry[] =>
  Object.entries(mod)
    .flatMap(([exportName, table]) => (is(table, SQLiteTable) ? [{ exportName, table }] : []))
    .sort((a, b) => a.exportName.localeCompare(b.exportName));

function defaultOf(c: SQLiteColumn, where: string): string {
  // An INTEGER PRIMARY KEY counts as having a default (SQLite's rowid): with AUTOINCREMENT identity gives it in
  // PostgreSQL; without, the key is a reference to another table's row (site_id) and always written.
  if (!c.hasDefault || (c.primary && c.columnType === 'SQLiteInteger' && c.default === undefined)) return '';
  if (is(c.default, SQL)) {
    const text = sqliteSql.sqlToQuery(c.default).sql;
    const pg = PG_SQL_DEFAULTS[text];
    if (!pg) throw new Error(`${where}: SQL default ${text} has no PostgreSQL form; add it to PG_SQL_DEFAULTS`);
    return `.default(sql\`${pg}\`)`;
  }
  if (c.columnType === 'SQLiteTextJson') return `.default(${JSON.stringify(c.default)})`;
  if (typeof c.default === 'string') return `.default(${q(c.default)})`;
  if (typeof c.default === 'number' || typeof c.default === 'boolean') return `.default(${String(c.default)})`;
  throw new Error(`${where}: default ${String(c.default)} of a kind the generator does not know`);
}

// SQLite INTEGER is a 64-bit integer: bigint is its exact equal (ids of a company's readings outgrow int4).
// JSON goes to json, not jsonb: json keeps the text as written, key order included, so a value reads back the
// same as from SQLite and the audit chain's canonical JSON hashes the same.
function columnCode(c: SQLiteColumn, key: string, exportName: string, fks: Map<string, string>): string {
  const where = `${exportName}.${key}`;
  let code: string;
  switch (c.columnType) {
    case 'SQLiteInteger':
      code = `bigint(${q(c.name)}, { mode: 'number' })`;
      break;
    case 'SQLiteBoolean':
      code = `boolean(${q(c.name)})`;
      break;
    case 'SQLiteReal':
      code = `doublePrecision(${q(c.name)})`;
      break;
    case 'SQLiteText':
      code = c.enumValues?.length ? `text(${q(c.name)}, { enum: [${c.enumValues.map(q).join(', ')}] })` : `text(${q(c.name)})`;
      break;
    case 'SQLiteTextJson':
      code = `json(${q(c.name)}).$type<(typeof sqlite.${exportName}.$inferSelect)[${q(key)}]>()`;
      break;
    default:
      throw new Error(`${where}: column type ${c.columnType} has no PostgreSQL mapping yet`);
  }
  if (c.primary) code += '.primaryKey()';
  if ((c as { autoIncrement?: boolean }).autoIncrement) code += '.generatedByDefaultAsIdentity()';
  if (c.notNull && !c.primary) code += '.notNull()';
  code += defaultOf(c, where);
  const fk = fks.get(c.name);
  if (fk) code += fk;
  return code;
}

/** The generated file's text. */
export function renderPgSchema(): string {
  const entries = tablesOf(sqlite);
  const tableVar = new Map(entries.map((e) => [e.table, e.exportName]));
  const used = new Set<string>(['pgTable']);
  let anySql = false;
  const bodies = entries.map(({ exportName, table }) => {
    const cfg = getTableConfig(table);
    if (cfg.checks.length || cfg.primaryKeys.length || cfg.uniqueConstraints.length)
      throw new Error(`${cfg.name}: checks, composite keys and unique constraints are not generated yet`);
    const fks = new Map<string, string>();
    for (const fk of cfg.foreignKeys) {
      const ref = fk.reference();
      if (ref.columns.length !== 1) throw new Error(`${cfg.name}: composite foreign keys are not generated yet`);
      const target = tableVar.get(ref.foreignTable as SQLiteTable);
      const targetKey = Object.entries(getTableColumns(ref.foreignTable)).find(([, col]) => col === ref.foreignColumns[0])![0];
      const actions = [fk.onDelete && `onDelete: ${q(fk.onDelete)}`, fk.onUpdate && `onUpdate: ${q(fk.onUpdate)}`].filter(Boolean);
      fks.set(ref.columns[0]!.name, `.references(() => ${target}.${targetKey}${actions.length ? `, { ${actions.join(', ')} }` : ''})`);
    }
    const columns = Object.entries(getTableColumns(table)).map(([key, c]) => {
      const code = columnCode(c as SQLiteColumn, key, exportName, fks);
      for (const fn of ['bigint', 'boolean', 'doublePrecision', 'text', 'json']) if (code.startsWith(`${fn}(`)) used.add(fn);
      if (code.includes('sql`')) anySql = true;
      return `    ${key}: ${code},`;
    });
    const keyOf = new Map(Object.entries(getTableColumns(table)).map(([k, c]) => [c.name, k]));
    const indexes = cfg.indexes.map((ix) => {
      if (ix.config.where) throw new Error(`${ix.config.name}: partial indexes are not generated yet`);
      used.add(ix.config.unique ? 'uniqueIndex' : 'index');
      const cols = ix.config.columns.map((c) => `t.${keyOf.get((c as SQLiteColumn).name)}`).join(', ');
      return `    ${ix.config.unique ? 'uniqueIndex' : 'index'}(${q(ix.config.name)}).on(${cols}),`;
    });
    const extra = indexes.length ? `,\n  (t) => [\n${indexes.join('\n')}\n  ]` : '';
    return `export const ${exportName} = pgTable(\n  ${q(cfg.name)},\n  {\n${columns.join('\n')}\n  }${extra},\n);\n`;
  });
  const imports = [...used].sort((a, b) => a.localeCompare(b));
  return [
    '// Generated by db/pg/generate-schema.ts from db/schema/ (npm run db:generate:pg). Do not edit: change db/schema/.',
    ...(anySql ? ["import { sql } from 'drizzle-orm';"] : []),
    `import { ${imports.join(', ')} } from 'drizzle-orm/pg-core';`,
    "import type * as sqlite from '../schema';",
    '',
    bodies.join('\n'),
  ].join('\n');
}

if (require.main === module) {
  fs.writeFileSync(PG_SCHEMA_FILE, renderPgSchema());
  console.log(`Wrote ${path.relative(process.cwd(), PG_SCHEMA_FILE)}; now run drizzle-kit generate --config drizzle.pg.config.ts`);
}
