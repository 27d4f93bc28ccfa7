// Figures for README's Reliability section: verify, re-link and checkpoint costs of the keyed audit chain, and what
// the sign-in slow-down lets a guesser try. `npx tsx tests/perf/audit-figures.ts [events]` (default 100,000).
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { migrateDb, openDb, sqliteClient } from '../../db/client';
import { auditKeyOf } from '../../server/services/audit';
import { sealAudit, verifyAudit } from '../../server/services/audit-verify';
import { createAccountThrottle } from '../../server/services/sign-in-throttle';

const N = Number(process.argv[2] ?? 100_000);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yp-audit-figures-'));
const file = path.join(dir, 'yieldpoint.db');
const ms = (t0: bigint) => Number(process.hrtime.bigint() - t0) / 1e6;

// A chain as the code before the key wrote it (plain SHA-256 links), site-less so no site rows are needed.
async function main() {
  const db = openDb(file);
  await migrateDb(db);
  const ins = sqliteClient(db).prepare(
    'insert into audit_events (site_id, user_id, actor, action, entity, entity_id, old_value, new_value, at, prev_hash, hash) values (null, null, ?, ?, ?, null, null, ?, ?, ?, ?)',
  );
  let prev = '0'.repeat(64);
  sqliteClient(db).transaction(() => {
    for (let i = 0; i < N; i++) {
      const at = new Date(Date.UTC(2026, 0, 1) + i * 1000).toISOString();
      const nv = { from: `10.0.${(i >> 8) & 255}.${i & 255}`, reason: 'wrong password' };
      const h = crypto
        .createHash('sha256')
        .update(JSON.stringify([null, null, `u${i % 50}@plant.test`, 'sign-in.failed', 'session', null, null, nv, at, prev]))
        .digest('hex');
      ins.run(`u${i % 50}@plant.test`, 'sign-in.failed', 'session', JSON.stringify(nv), at, prev, h);
      prev = h;
    }
  })();
  sqliteClient(db).close();

  const again = openDb(file);
  let t0 = process.hrtime.bigint();
  auditKeyOf(again); // finds the legacy chain, checks it and re-links it with the key
  const relinkMs = ms(t0);
  t0 = process.hrtime.bigint();
  await sealAudit(again, new Date());
  const sealMs = ms(t0);
  t0 = process.hrtime.bigint();
  const v = await verifyAudit(again, null);
  const verifyMs = ms(t0);
  sqliteClient(again).close();
  console.log(
    `audit chain of ${N.toLocaleString('en')} events: legacy check + re-link ${relinkMs.toFixed(0)} ms, one checkpoint ${sealMs.toFixed(1)} ms, verify (links + checkpoints) ${verifyMs.toFixed(0)} ms, ok=${v.ok}`,
  );
  fs.rmSync(dir, { recursive: true, force: true });
}

// A guesser trying one account every 100 ms for an hour against the defaults (5 free, 1 s doubling to 60 s).
let now = 0;
const throttle = createAccountThrottle({ now: () => new Date(now) }, { perAddress: 300, perAccount: 5, windowMs: 15 * 60_000, maxDelayMs: 60_000 });
let tried = 0;
for (; now < 3_600_000; now += 100) if (throttle.begin('account:victim@plant.test') === 0) tried++;
console.log(`sign-in slow-down: a guesser trying every 100 ms for one hour gets ${tried} passwords checked on one account`);

void main();
