import Database from 'better-sqlite3';
import fs from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { openDb, sqliteClient } from '../../db/client';
import { DEMO_USERS } from '../../db/seed';
import { verifyAudit } from '../../server/services/audit-verify';
import { sessionCookie, startServer, type RunningServer } from '../support/server';

// Crash consistency: SIGKILL the real server while concurrent writes are in flight, restart it on the same
// file, and check that SQLite and the audit chain are whole and that every write answered 2xx survived.
const ROUNDS = Number(process.env.CRASH_ROUNDS ?? 20);
const SEED = Number(process.env.CRASH_SEED ?? 20261201);

function mulberry32(a: number) {
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const admin = DEMO_USERS.find((u) => u.role === 'admin')!;
const operator = DEMO_USERS.find((u) => u.role === 'operator')!;
let server: RunningServer | null = null;
afterAll(async () => {
  await server?.stop();
  if (server) fs.rmSync(server.dir, { recursive: true, force: true });
});

describe(`crash consistency (seed ${SEED}, ${ROUNDS} rounds)`, () => {
  it('keeps every acknowledged write and a verifiable audit chain across SIGKILLs', async () => {
    const random = mulberry32(SEED);
    const acknowledged = new Set<string>();
    const acknowledgedReadings = new Set<string>();
    let dir: string | undefined;
    for (let round = 0; round < ROUNDS; round++) {
      server = await startServer(dir ? { dir } : {});
      dir = server.dir;
      const { baseURL } = server;
      const cookie = await sessionCookie(baseURL, admin.email, admin.password);
      const headers = { cookie, 'content-type': 'application/json', 'x-yieldpoint-client': 'crash-test' };
      const users = ((await (await fetch(`${baseURL}/api/users`, { headers })).json()) as { users: { id: number }[] }).users;
      const opHeaders = { ...headers, cookie: await sessionCookie(baseURL, operator.email, operator.password) };
      const batches = (
        (await (await fetch(`${baseURL}/api/batches`, { headers: opHeaders })).json()) as { batches: { id: number; state: string; startedAt: string }[] }
      ).batches;
      const running = batches.find((b) => b.state === 'running')!;
      let stop = false;
      // Operators' readings, each with its own idempotency key, beside the admin's edits.
      const loggers = [0, 1].map(async (w) => {
        for (let k = 0; !stop; k++) {
          const key = `crash-r${round}-w${w}-${k}`;
          const takenAt = new Date(Date.parse(running.startedAt) + (round * 1000 + w * 500 + k) * 1000).toISOString();
          try {
            const res = await fetch(`${baseURL}/api/batches/${running.id}/readings`, {
              method: 'POST',
              headers: opHeaders,
              body: JSON.stringify({ key, takenAt, c: 50 }),
            });
            if (res.ok) acknowledgedReadings.add(key);
          } catch {
            return;
          }
        }
      });
      const writers = users.map(async (u, w) => {
        for (let k = 0; !stop; k++) {
          const name = `r${round}-w${w}-${k}`;
          try {
            const res = await fetch(`${baseURL}/api/users/${u.id}`, { method: 'PATCH', headers, body: JSON.stringify({ name }) });
            if (res.ok) acknowledged.add(name);
          } catch {
            return; // the server died mid-request: this write was never acknowledged
          }
        }
      });
      await new Promise((r) => setTimeout(r, 100 + random() * 400));
      // On a loaded machine the first answers can take longer than that window: wait (at most 10 s) until this
      // round has acknowledged a few edits, so every round kills the server with writes in flight.
      const enough = acknowledged.size + 6;
      for (let waited = 0; acknowledged.size < enough && waited < 10_000; waited += 20) await new Promise((r) => setTimeout(r, 20));
      server.child.kill('SIGKILL');
      stop = true;
      await Promise.all([...writers, ...loggers]);
      await new Promise((r) => (server!.child.exitCode !== null || server!.child.signalCode !== null ? r(null) : server!.child.once('exit', r)));
    }
    server = null;

    const file = `${dir}/yieldpoint.db`;
    const raw = new Database(file);
    expect(raw.pragma('integrity_check', { simple: true })).toBe('ok');
    expect(raw.pragma('foreign_key_check')).toEqual([]);
    const names = new Set(
      (raw.prepare(`select json_extract(new_value, '$.name') as name from audit_events where action = 'user.update'`).all() as { name: string }[]).map(
        (r) => r.name,
      ),
    );
    const keys = new Set((raw.prepare('select client_key as k from batch_readings').all() as { k: string }[]).map((r) => r.k));
    raw.close();
    const missingReadings = [...acknowledgedReadings].filter((k) => !keys.has(k));
    expect(acknowledgedReadings.size).toBeGreaterThan(ROUNDS);
    expect(missingReadings).toEqual([]);
    const missing = [...acknowledged].filter((n) => !names.has(n));
    expect(acknowledged.size).toBeGreaterThan(ROUNDS * 5);
    expect(missing).toEqual([]);
    const db = openDb(file);
    // Whole links, and every signed checkpoint written at each start still matches what the file holds.
    const audit = await verifyAudit(db, 1);
    expect(audit.problems).toEqual([]);
    expect(audit.checkpoints).toBeGreaterThan(0);
    sqliteClient(db).close();
    fs.rmSync(dir!, { recursive: true, force: true });
  }, 600_000);

  it('stays up while another process holds the write lock: refused calls answered, writes 503, then 2xx again', async () => {
    const s = await startServer();
    try {
      const cookie = await sessionCookie(s.baseURL, admin.email, admin.password);
      const headers = { cookie, 'content-type': 'application/json', 'x-yieldpoint-client': 'crash-test' };
      // Another program holds BEGIN IMMEDIATE for longer than the server's busy timeout (5 s).
      const holder = new Database(s.databaseFile);
      holder.exec('BEGIN IMMEDIATE');
      try {
        expect((await fetch(`${s.baseURL}/api/users`)).status).toBe(401);
        const write = await fetch(`${s.baseURL}/api/users/2`, { method: 'PATCH', headers, body: JSON.stringify({ name: 'While locked' }) });
        expect(write.status).toBe(503);
        expect((await fetch(`${s.baseURL}/api/users`, { headers })).status).toBe(200);
        for (let i = 0; i < 5; i++) expect((await fetch(`${s.baseURL}/api/lots/${'x'.repeat(2000)}`)).status).toBe(401);
        expect(s.child.exitCode).toBeNull();
      } finally {
        holder.exec('ROLLBACK');
        holder.close();
      }
      const after = await fetch(`${s.baseURL}/api/users/2`, { method: 'PATCH', headers, body: JSON.stringify({ name: 'After the lock' }) });
      expect(after.status).toBe(200);
      expect(s.child.exitCode).toBeNull();
    } finally {
      await s.stop();
      fs.rmSync(s.dir, { recursive: true, force: true });
    }
  }, 120_000);
});
