import Database from 'better-sqlite3';
import { spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateDb, openDb, writeTx, sqliteClient } from '../../db/client';
import { copySqliteToPg, tablesInForeignKeyOrder } from '../../db/pg/copy';
import { seedDemo } from '../../db/seed';
import { getTableConfig } from 'drizzle-orm/sqlite-core';
import { appendAudit, auditKeyOf, eventHash, GENESIS } from '../../server/services/audit';
import { verifyAudit } from '../../server/services/audit-verify';
import { startPostgres, type TestPostgres } from '../support/postgres';
import { ROOT } from '../support/server';

// The seeded demo installation (two sites) with an audit chain per site whose JSON values carry keys out of
// alphabetical order, nesting and non-ASCII text: a copy that re-serialised JSON (jsonb) would break the links.
async function demoInstallation(dir: string) {
  const file = path.join(dir, 'yieldpoint.db');
  const db = openDb(file);
  await migrateDb(db);
  const sites = [
    (await seedDemo(db, { bcryptCost: 4 })).siteId,
    (await seedDemo(db, { bcryptCost: 4, siteName: 'Second plant', emailDomain: 'second.example' })).siteId,
  ];
  const at = new Date('2026-12-03T08:00:00.000Z');
  await writeTx(db, async (tx) => {
    for (let i = 0; i < 60; i++) {
      const siteId = sites[i % 2]!;
      await appendAudit(tx, {
        siteId,
        userId: null,
        actor: 'copy test',
        action: 'lot.update',
        entity: 'lot',
        entityId: i,
        oldValue: { zeta: i, alpha: { y: 'Ä°C', b: [3, 1.5e-7] } },
        newValue: i % 3 ? null : { note: `réglé ${i}`, amount: 12.3456789012345 },
        at: new Date(at.getTime() + i * 1000),
      });
    }
  });
  for (const s of sites) expect((await verifyAudit(db, s)).ok).toBe(true);
  const key = auditKeyOf(db);
  sqliteClient(db).close();
  return { file, sites, key };
}

const sqliteRows = (file: string, table: string) => {
  const s = new Database(file, { readonly: true });
  try {
    return s.prepare(`select * from "${table}" order by rowid`).raw(true).safeIntegers(true).all() as unknown[][];
  } finally {
    s.close();
  }
};

// A table's content hash: rows in primary-key order, every integer written exactly (SQLite's as BigInt, PostgreSQL's
// cast to text, booleans as 0/1), JSON as its stored text, doubles as JavaScript reads them.
const contentHash = (rows: unknown[][], pkIndex: number) => {
  const norm = rows.map((r) => r.map((v) => (typeof v === 'bigint' ? `int ${v}` : v)));
  const key = (r: unknown[]) => String(r[pkIndex]);
  norm.sort((a, b) => (key(a) < key(b) ? -1 : key(a) > key(b) ? 1 : 0));
  return crypto.createHash('sha256').update(JSON.stringify(norm)).digest('hex');
};

describe('npm run db:copy: a whole installation from SQLite into PostgreSQL 15', () => {
  let server: TestPostgres;
  let dir: string;
  let installation: Awaited<ReturnType<typeof demoInstallation>>;
  let url: string;
  let client: pg.Client;
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-copy-'));
    installation = await demoInstallation(dir);
    server = await startPostgres();
    url = await server.createDatabase('copy');
  }, 120_000);
  afterAll(async () => {
    await client?.end();
    await server?.stop();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('copies every table in foreign-key order, with the same rows and content per table', async () => {
    const report = await copySqliteToPg(installation.file, url);
    const order = report.tables.map((t) => t.name);
    // Every table comes after the tables it references.
    for (const t of tablesInForeignKeyOrder()) {
      const cfg = getTableConfig(t);
      for (const fk of cfg.foreignKeys) expect(order.indexOf(getTableConfig(fk.reference().foreignTable).name)).toBeLessThanOrEqual(order.indexOf(cfg.name));
    }
    client = new pg.Client({ connectionString: url });
    await client.connect();
    const total = report.tables.reduce((a, t) => a + t.rows, 0);
    expect(total).toBeGreaterThan(1000);
    for (const { name, rows } of report.tables) {
      const source = sqliteRows(installation.file, name);
      expect(rows, name).toBe(source.length);
      const cols = (
        await client.query(`select column_name, data_type from information_schema.columns where table_schema = 'public' and table_name = $1`, [name])
      ).rows as { column_name: string; data_type: string }[];
      const sqliteCols = (new Database(installation.file, { readonly: true }).pragma(`table_info("${name}")`) as { name: string }[]).map((c) => c.name);
      const typeOf = new Map(cols.map((c) => [c.column_name, c.data_type]));
      const select = sqliteCols.map((c) => {
        const type = typeOf.get(c);
        return type === 'boolean' ? `'int ' || "${c}"::int` : type === 'bigint' ? `'int ' || "${c}"` : type === 'json' ? `"${c}"::text` : `"${c}"`;
      });
      const { rows: copied } = await client.query({ text: `select ${select.join(', ')} from "${name}"`, rowMode: 'array' });
      const pkIndex = Math.max(0, sqliteCols.indexOf('id'));
      expect(contentHash(copied, pkIndex), name).toBe(contentHash(source, pkIndex));
    }
  });

  it("keeps every audit row byte for byte, so each site's chain verifies with the installation key", async () => {
    const s = new Database(installation.file, { readonly: true });
    const source = s
      .prepare(
        `select cast(id as text), cast(site_id as text), cast(user_id as text), actor, action, entity, entity_id, old_value, new_value, at, prev_hash, hash from audit_events order by audit_events.id`,
      )
      .raw(true)
      .all();
    s.close();
    const { rows } = await client.query({
      text: `select id::text, site_id::text, user_id::text, actor, action, entity, entity_id, old_value::text, new_value::text, at, prev_hash, hash from audit_events order by audit_events.id`,
      rowMode: 'array',
    });
    expect(source.length).toBeGreaterThanOrEqual(60);
    for (let i = 0; i < source.length; i++) expect(rows[i], `audit row ${i}`).toEqual(source[i]);
    expect(rows.length).toBe(source.length);
    for (const siteId of installation.sites) {
      const { rows: chain } = await client.query(`select * from audit_events where site_id = $1 order by id`, [siteId]);
      expect(chain.length).toBe(30);
      let prev = GENESIS;
      for (const r of chain) {
        // int8 reaches this plain client as text; the chain hashes numbers, as the app reads them.
        const row = {
          siteId: Number(r.site_id),
          userId: r.user_id === null ? null : Number(r.user_id),
          actor: r.actor,
          action: r.action,
          entity: r.entity,
          entityId: r.entity_id,
          oldValue: r.old_value,
          newValue: r.new_value,
          at: r.at,
          prevHash: r.prev_hash,
        };
        expect(r.prev_hash).toBe(prev);
        expect(eventHash(installation.key, row)).toBe(r.hash);
        prev = r.hash;
      }
    }
  });

  it('moves every identity sequence past the largest id copied', async () => {
    for (const table of ['sites', 'audit_events', 'batch_readings']) {
      const {
        rows: [{ max }],
      } = await client.query(`select max(id) as max from "${table}"`);
      const {
        rows: [{ next }],
      } = await client.query(`select nextval(pg_get_serial_sequence('"${table}"', 'id')) as next`);
      expect(Number(next), table).toBe(Number(max) + 1);
    }
  });

  it('refuses a target that already holds data, saying so, and changes nothing', async () => {
    const before = (await client.query(`select count(*)::int as n from sites`)).rows[0].n;
    await expect(copySqliteToPg(installation.file, url)).rejects.toThrow(/already holds data in .*sites \(2\)/);
    expect((await client.query(`select count(*)::int as n from sites`)).rows[0].n).toBe(before);
  });

  it('is what npm run db:copy runs, and a copy that fails half-way leaves the target empty', async () => {
    const target = await server.createDatabase('copy_cli');
    const r = spawnSync(process.execPath, ['--import', 'tsx', 'db/pg/copy.ts', '--from', installation.file, '--to', target], { cwd: ROOT, encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/Copied \d+ rows in \d+ tables/);

    // A boolean column holding 2 stops the copy at that table, after earlier tables were inserted: all rolled back.
    const broken = path.join(dir, 'broken.db');
    fs.copyFileSync(installation.file, broken);
    const b = new Database(broken);
    b.exec(`update vessel_sources set is_enabled = 2 where id = (select min(id) from vessel_sources)`);
    const hasSource = (b.prepare(`select count(*) as n from vessel_sources`).get() as { n: number }).n > 0;
    if (!hasSource) b.exec(`update users set is_active = 2 where id = 1`);
    b.close();
    const empty = await server.createDatabase('copy_broken');
    await expect(copySqliteToPg(broken, empty)).rejects.toThrow(/not a boolean/);
    const c = new pg.Client({ connectionString: empty });
    await c.connect();
    expect((await c.query(`select count(*)::int as n from sites`)).rows[0].n).toBe(0);
    expect((await c.query(`select count(*)::int as n from users`)).rows[0].n).toBe(0);
    await c.end();
  });
});
