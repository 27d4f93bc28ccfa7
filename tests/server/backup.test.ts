import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { afterEach, describe, expect, it } from 'vitest';
import { backupDatabase, checkDatabase, restoreDatabase } from '../../db/backup';
import { migrateDb, openDb, sqliteClient } from '../../db/client';
import { seedDemo } from '../../db/seed';
import { auditKeyOf } from '../../server/services/audit';
import { verifyAudit } from '../../server/services/audit-verify';

const dirs: string[] = [];
const tmp = () => {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), 'yp-backup-'));
  dirs.push(d);
  return d;
};
afterEach(() => dirs.splice(0).forEach((d) => fs.rmSync(d, { recursive: true, force: true })));

// A second thread appends audit events as fast as it can while the backup runs, as a busy server would.
const WRITER = `
const { parentPort, workerData } = require('node:worker_threads');
const Database = require('better-sqlite3');
const crypto = require('node:crypto');
const db = new Database(workerData.file);
const key = Buffer.from(require('node:fs').readFileSync(require('node:path').join(require('node:path').dirname(workerData.file), '.audit-key'), 'utf8').trim(), 'base64');
db.pragma('journal_mode = WAL'); db.pragma('busy_timeout = 5000');
const last = db.prepare('select hash from audit_events where site_id = 1 order by id desc limit 1');
const ins = db.prepare('insert into audit_events (site_id, user_id, actor, action, entity, entity_id, old_value, new_value, at, prev_hash, hash) values (1, null, ?, ?, ?, null, null, null, ?, ?, ?)');
let n = 0; let stop = false;
parentPort.on('message', () => { stop = true; });
function burst() {
  for (let i = 0; i < 200 && !stop; i++) {
    db.transaction(() => {
      const prev = (last.get() || { hash: '0'.repeat(64) }).hash;
      const at = new Date(Date.UTC(2026, 11, 1) + n * 1000).toISOString();
      const h = crypto.createHmac('sha256', key).update(JSON.stringify([1, null, 'load@test', 'load', 'test', null, null, null, at, prev])).digest('hex');
      ins.run('load@test', 'load', 'test', at, prev, h);
    }).immediate();
    n++;
  }
  if (stop) { db.close(); parentPort.postMessage(n); } else setImmediate(burst);
}
burst();
`;

describe('backup and restore', () => {
  it('takes a consistent online backup under write load and restores it', async () => {
    const dir = tmp();
    const live = path.join(dir, 'live.db');
    const db = openDb(live);
    await migrateDb(db);
    await seedDemo(db, { bcryptCost: 4 });
    auditKeyOf(db); // the writer below links with the installation's key
    sqliteClient(db).close();

    const writer = new Worker(WRITER, { eval: true, workerData: { file: live } });
    await new Promise((r) => setTimeout(r, 150));
    const backup = path.join(dir, 'backup.db');
    const check = await backupDatabase(live, backup);
    writer.postMessage('stop');
    const written: number = await new Promise((r) => writer.once('message', r));
    expect(written).toBeGreaterThan(0);
    expect(check.integrity).toBe('ok');
    expect(check.foreignKeyErrors).toBe(0);
    expect(check.tables.users).toBe(5);

    // Restore into a fresh path and prove the copy is a whole, verifiable database.
    const restored = path.join(dir, 'restored.db');
    const after = await restoreDatabase(backup, restored);
    expect(after.integrity).toBe('ok');
    expect(after.tables).toEqual(check.tables);
    const rdb = openDb(restored);
    expect(await verifyAudit(rdb, 1)).toMatchObject({ ok: true, events: check.tables.audit_events });
    sqliteClient(rdb).close();
    // The live database kept growing after the snapshot.
    expect(checkDatabase(live).tables.audit_events).toBeGreaterThanOrEqual(check.tables.audit_events!);
  });

  it('refuses to restore a damaged file', async () => {
    const dir = tmp();
    const bad = path.join(dir, 'bad.db');
    fs.writeFileSync(bad, 'not a database');
    await expect(restoreDatabase(bad, path.join(dir, 'x.db'))).rejects.toThrow();
  });
});
