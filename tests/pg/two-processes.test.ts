// Two server processes on one PostgreSQL database, written to at once, one of them killed (SIGKILL) half-way:
// what SQLite got from its single writer must come from PostgreSQL here. Runs in the `server-pg` project only.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_SEATS } from '../../db/seed';
import { freshPgDatabase } from '../support/pg-database';
import { sessionCookie, startServer, type RunningServer } from '../support/server';

const HEADERS = { 'content-type': 'application/json', 'x-yieldpoint-client': 'test' };
const SITES = ['haldenbay.test'];

let url: string;
let dataDir: string;
let a: RunningServer;
let b: RunningServer;

const env = () => ({ DATABASE_URL: url, DATA_DIR: dataDir, DATABASE_POOL: '8' });

beforeAll(async () => {
  url = await freshPgDatabase();
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yp-two-'));
  // The first migrates and seeds the demo site; the second finds the database filled and only serves it.
  a = await startServer({ env: env() });
  b = await startServer({ env: env() });
}, 180_000);

afterAll(async () => {
  await Promise.all([a?.stop(), b?.stop()]);
  fs.rmSync(dataDir, { recursive: true, force: true });
});

const post = (base: string, cookie: string, p: string, body: unknown) =>
  fetch(base + p, { method: 'POST', headers: { ...HEADERS, cookie }, body: JSON.stringify(body) }).then(
    (r) => r.status,
    () => 0, // the process was killed: no answer, so nothing was acknowledged
  );

describe('two server processes on one PostgreSQL database', () => {
  it('keeps every acknowledged reading once, never oversells seats, and keeps every audit chain whole across a SIGKILL', async () => {
    // A session made by one process holds on the other (sessions and the session secret are shared).
    const op = await sessionCookie(a.baseURL, 'operator@haldenbay.test', 'demo-operator-26');
    const admin = await sessionCookie(b.baseURL, 'admin@haldenbay.test', 'demo-admin-26');
    const batches = (await (await fetch(`${b.baseURL}/api/batches`, { headers: { ...HEADERS, cookie: op } })).json()).batches as {
      id: number;
      state: string;
    }[];
    const batchId = batches.find((x) => x.state === 'running')!.id;
    const usage = (await (await fetch(`${a.baseURL}/api/billing`, { headers: { ...HEADERS, cookie: admin } })).json()) as { seats: number; seatsInUse: number };
    expect(usage.seats).toBe(DEMO_SEATS);

    // Readings: every key sent to both processes at once (a client retrying on the other), 40 rounds; process A
    // is killed after round 30. Invites: more than the free seats, half to each process, all at once.
    const acked = new Set<string>();
    const sent: Promise<void>[] = [];
    const free = usage.seats - usage.seatsInUse;
    let invites: Promise<number>[] = [];
    const t0 = Date.now() - 60_000;
    for (let i = 0; i < 40; i++) {
      if (i === 5)
        invites = Array.from({ length: free + 4 }, (_, k) =>
          post(k % 2 ? b.baseURL : a.baseURL, admin, '/api/invites', { email: `new${k}@haldenbay.test`, role: 'operator' }),
        );
      const key = `two-proc-${i}`;
      const body = { key, takenAt: new Date(t0 + i * 1000).toISOString(), c: 55 + (i % 7) / 10 };
      for (const s of [a, b])
        sent.push(
          post(s.baseURL, op, `/api/batches/${batchId}/readings`, body).then((status) => {
            expect([0, 200, 201]).toContain(status);
            if (status === 200 || status === 201) acked.add(key);
          }),
        );
      if (i === 30) a.child.kill('SIGKILL');
      if (i % 5 === 0) await new Promise((r) => setTimeout(r, 40));
    }
    await Promise.all(sent);
    const inviteStatuses = await Promise.all(invites);

    const c = new pg.Client({ connectionString: url });
    await c.connect();
    try {
      const rows = (
        await c.query(`select client_key, count(*)::int as n from batch_readings where batch_id = $1 and client_key like 'two-proc-%' group by client_key`, [
          batchId,
        ])
      ).rows as { client_key: string; n: number }[];
      // Every acknowledged reading is there, each key exactly once.
      for (const k of acked) expect(rows.map((r) => r.client_key)).toContain(k);
      expect(rows.every((r) => r.n === 1)).toBe(true);
      expect(acked.size).toBeGreaterThanOrEqual(9); // rounds 31-39 went to the live process at least
      // Seats: what was accepted fits, whatever process took it.
      const accepted = inviteStatuses.filter((s) => s === 201).length;
      expect(accepted).toBeLessThanOrEqual(free);
      expect(inviteStatuses.filter((s) => s !== 0 && s !== 201).every((s) => s === 402 || s === 409)).toBe(true);
      const after = (await (await fetch(`${b.baseURL}/api/billing`, { headers: { ...HEADERS, cookie: admin } })).json()) as {
        seats: number;
        seatsInUse: number;
      };
      // Some invites landed (answered or not: a killed process may have committed one it never answered), none beyond.
      expect(after.seatsInUse).toBeGreaterThan(usage.seatsInUse);
      expect(after.seatsInUse).toBeLessThanOrEqual(after.seats);
    } finally {
      await c.end();
    }
    // Every site's chain verifies, read through the surviving process.
    for (const domain of SITES) {
      const cookie = await sessionCookie(b.baseURL, `admin@${domain}`, 'demo-admin-26');
      const v = await (await fetch(`${b.baseURL}/api/audit-events/verify`, { headers: { ...HEADERS, cookie } })).json();
      expect(v, domain).toMatchObject({ ok: true, problems: [] });
    }
  }, 120_000);
});
