// PostgreSQL faults at their real depth: a database that turns read-only (as a hot standby is: 25006) and a
// server stopped at once in the middle of writes (a crash or a failover), then back. What must hold: a refused
// write is a 503 that changed nothing, a read that cannot reach the server is a 503 (never a 500), every reading
// answered 2xx is stored exactly once once the clients have retried, the audit chain verifies, and the product
// writes again by itself once the server is back. Runs in the `server-pg` project only, on a cluster of its own.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionTablesVersion, type Db } from '../../db/client';
import { migratePgDb, openPgDb } from '../../db/pg/client';
import { seedDemo } from '../../db/seed';
import { serveTestApp, TestClock, type Client, type TestApp } from '../server/harness';
import { startPostgres, type TestPostgres } from '../support/postgres';
import { within } from '../support/within';

let cluster: TestPostgres;
let url: string;
let dataDir: string;
let db: Db;
let t: TestApp;
let byHand: pg.Client;
let operator: Client;
let admin: Client;
let batchId: number;

const connectByHand = async () => {
  byHand = new pg.Client({ connectionString: url });
  await byHand.connect();
};
/**
 * Ends every connection of the product to its database (pool and listener), as a standby's restart would, and
 * waits until the pool has let them go (a request on a connection the pool has not yet seen die is answered 503
 * once, as after a real restart).
 */
async function dropConnections() {
  await byHand.query("select pg_terminate_backend(pid) from pg_stat_activity where datname = 'faults' and pid <> pg_backend_pid()");
  const pool = (db as unknown as { $client: pg.Pool }).$client;
  await within(5_000, () => pool.totalCount === 0, 50);
}
const storedKeys = async (prefix: string) =>
  (
    await byHand.query<{ client_key: string; n: number }>(
      'select client_key, count(*)::int as n from batch_readings where batch_id = $1 and client_key like $2 group by client_key',
      [batchId, `${prefix}%`],
    )
  ).rows;

let minute = 0;
const reading = (key: string) => ({ key, takenAt: new Date(Date.now() - 3_600_000 + ++minute * 1000).toISOString(), c: 55.2 });

beforeAll(async () => {
  // PostgreSQL's durable defaults: the test clusters' synchronous_commit=off would lose the last commits (sign-ins
  // and acknowledged readings alike) when the server stops at once, which is what this file does.
  cluster = await startPostgres({ durable: true });
  url = await cluster.createDatabase('faults');
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yp-faults-'));
  db = await openPgDb(url, { dataDir, max: 4 });
  await migratePgDb(db);
  await seedDemo(db, { bcryptCost: 4 });
  // The wall clock: readings are taken now, in the seeded running batch.
  const clock = new TestClock();
  clock.now = () => new Date();
  t = await serveTestApp(db, clock);
  await connectByHand();
  operator = await t.signIn('operator');
  admin = await t.signIn('admin');
  const { batches } = (await operator.get('/api/batches')).body as { batches: { id: number; state: string }[] };
  batchId = batches.find((b) => b.state === 'running')!.id;
}, 60_000);

afterAll(async () => {
  await byHand?.end().catch(() => undefined);
  await t?.close();
  await cluster?.stop();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('PostgreSQL faults', () => {
  it('answers 503 to writes on a read-only database, keeps reading, and writes again once it is writable', async () => {
    const before = await byHand.query<{ n: number }>('select count(*)::int as n from audit_events');
    await byHand.query('alter database faults set default_transaction_read_only = on');
    await dropConnections();
    try {
      const refused = await operator.post(`/api/batches/${batchId}/readings`, reading('faults-ro-1'));
      expect(refused.status).toBe(503);
      expect(refused.body.error.code).toBe('database_unwritable');
      expect(refused.body.error.message).toMatch(/read-only/);
      expect((await operator.get('/api/batches')).status).toBe(200);
    } finally {
      await byHand.query('alter database faults reset default_transaction_read_only');
      await dropConnections();
    }
    expect(await storedKeys('faults-ro-')).toEqual([]);
    expect((await byHand.query<{ n: number }>('select count(*)::int as n from audit_events')).rows[0]!.n).toBe(before.rows[0]!.n);
    expect((await operator.post(`/api/batches/${batchId}/readings`, reading('faults-ro-1'))).status).toBe(201);
    expect(await storedKeys('faults-ro-')).toEqual([{ client_key: 'faults-ro-1', n: 1 }]);
  });

  it('loses no acknowledged reading when the server stops mid-write, answers 503 while it is down, and recovers by itself', async () => {
    const keys = Array.from({ length: 60 }, (_, i) => `faults-down-${i}`);
    const bodies = new Map(keys.map((k) => [k, reading(k)]));
    const acked = new Set<string>();
    const statuses: number[] = [];
    const send = async (key: string) => {
      const r = await operator.post(`/api/batches/${batchId}/readings`, bodies.get(key)).catch(() => ({ status: 0 }));
      statuses.push(r.status);
      if (r.status === 200 || r.status === 201) acked.add(key);
    };
    // Readings in flight, a few at a time, with the server stopped after the first third.
    const inFlight: Promise<void>[] = [];
    for (const [i, key] of keys.entries()) {
      inFlight.push(send(key));
      if (i === 20) {
        await byHand.end().catch(() => undefined);
        cluster.down();
      }
      if (i % 4 === 3) await new Promise((r) => setTimeout(r, 5));
    }
    await Promise.all(inFlight);
    // While it is down: reads and writes are 503, never 500, and say why.
    const read = await operator.get('/api/batches');
    expect(read.status).toBe(503);
    expect(read.body.error.code).toBe('database_unavailable');
    expect(
      statuses.every((s) => [200, 201, 503].includes(s)),
      `statuses ${[...new Set(statuses)].join(', ')}`,
    ).toBe(true);
    expect(statuses.filter((s) => s === 503).length).toBeGreaterThan(0);
    // Nothing is kept while the session watch cannot listen.
    await within(5_000, () => sessionTablesVersion(db) === null, 50);

    cluster.up();
    await connectByHand();
    // The clients retry what was not acknowledged, with the same keys (as the phone's queue does).
    await within(10_000, async () => (await operator.get('/api/batches')).status === 200, 50);
    for (const key of keys) if (!acked.has(key)) await send(key);
    expect(acked.size, `statuses ${statuses.join(',')}`).toBe(keys.length);

    const stored = await storedKeys('faults-down-');
    expect(stored.map((r) => r.client_key).sort()).toEqual([...keys].sort());
    expect(stored.every((r) => r.n === 1)).toBe(true);
    const verify = await admin.get('/api/audit-events/verify');
    expect(verify.body).toMatchObject({ ok: true, problems: [] });
    // The session watch listens again, so session rows are kept again.
    await within(10_000, () => sessionTablesVersion(db) !== null, 50);
  }, 60_000);
});
