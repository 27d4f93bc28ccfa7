// The session rows a process keeps on PostgreSQL (server/repositories/sessions.ts sessionWithUserNow): kept while
// the trigger of migrations/pg/0003 announces no change to sessions, users or sites; a change from another process,
// or by hand, ends a session everywhere at once. Two apps on one database stand for two server processes.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionTablesVersion } from '../../db/client';
import { openPgDb } from '../../db/pg/client';
import { seedDemo } from '../../db/seed';
import { sessionWithUserNow } from '../../server/repositories/sessions';
import { Client, email, serveTestApp, TestClock, type TestApp } from '../server/harness';
import { freshPgDatabase } from '../support/pg-database';
import { within } from '../support/within';

let url: string;
let dataDir: string;
let a: TestApp;
let b: TestApp;
let byHand: pg.Client;

const proc = async () => serveTestApp(await openPgDb(url, { dataDir, max: 4 }), new TestClock());

/** The same caller (its cookie) against another process. */
function sameCallerAt(p: TestApp, c: Client): Client {
  const other = new Client(p.base);
  other.cookie = c.cookie;
  return other;
}

/** Whether the process answering `c` takes its cookie as a session (GET /api/session is open: user or null). */
const signedIn = async (c: Client) => (await c.get('/api/session')).body?.user != null;

const listening = (p: TestApp) => within(5_000, async () => sessionTablesVersion(p.db) !== null);

beforeAll(async () => {
  url = await freshPgDatabase();
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yp-watch-'));
  [a, b] = [await proc(), await proc()];
  await seedDemo(a.db, { bcryptCost: 4 });
  byHand = new pg.Client({ connectionString: url });
  await byHand.connect();
  await Promise.all([listening(a), listening(b)]);
}, 60_000);

afterAll(async () => {
  await byHand?.end();
  for (const p of [a, b]) await p?.close();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('session rows kept on PostgreSQL', () => {
  it('keeps a session row between requests while nothing it joins changes', async () => {
    const c = await a.signIn('engineer');
    expect(await signedIn(c)).toBe(true);
    const sid = (await byHand.query<{ id: string }>('select id from sessions order by created_at desc limit 1')).rows[0]!.id;
    const first = await sessionWithUserNow(b.db, sid);
    expect(first?.user.email).toBe(email('engineer'));
    // The same object again: no read of the database.
    expect(await sessionWithUserNow(b.db, sid)).toBe(first);
  });

  it('ends a session in the other process once it signs out in one', async () => {
    const atA = await a.signIn('engineer');
    // The same cookie kept (the sign-out clears the caller's own).
    const stolenAtA = sameCallerAt(a, atA);
    const atB = sameCallerAt(b, atA);
    expect(await signedIn(atB)).toBe(true);
    expect(await signedIn(atB)).toBe(true);
    expect((await atA.del('/api/session')).status).toBe(204);
    // The process that signed out refuses at once; the other as soon as the notification arrives.
    expect(await signedIn(stolenAtA)).toBe(false);
    expect((await stolenAtA.get('/api/lots')).status).toBe(401);
    const ms = await within(2_000, async () => !(await signedIn(atB)));
    expect(ms).toBeLessThan(1_000);
    expect((await atB.get('/api/lots')).status).toBe(401);
  });

  it('ends the sessions of a user changed by hand (psql), in every process', async () => {
    const atA = await a.signIn('supervisor');
    const atB = sameCallerAt(b, atA);
    expect(await signedIn(atA)).toBe(true);
    expect(await signedIn(atB)).toBe(true);
    await byHand.query("update users set role = 'operator' where email = $1", [email('supervisor')]);
    for (const c of [atA, atB]) await within(2_000, async () => !(await signedIn(c)));
    await byHand.query("update users set role = 'supervisor' where email = $1", [email('supervisor')]);
  });

  it('keeps nothing from before a lost listening connection, and listens again', async () => {
    const c = await a.signIn('operator');
    expect(await signedIn(c)).toBe(true);
    const sid = (await byHand.query<{ id: string }>('select id from sessions order by created_at desc limit 1')).rows[0]!.id;
    const before = await sessionWithUserNow(b.db, sid);
    expect(await sessionWithUserNow(b.db, sid)).toBe(before);
    const version = sessionTablesVersion(b.db);
    // Every process's listening connection is cut (as a restart of PostgreSQL or a network fault would).
    const cut = await byHand.query("select pg_terminate_backend(pid) from pg_stat_activity where application_name = 'yieldpoint-session-watch'");
    expect(cut.rowCount).toBe(2);
    await within(5_000, async () => sessionTablesVersion(b.db) !== version && sessionTablesVersion(b.db) !== null);
    const after = await sessionWithUserNow(b.db, sid);
    expect(after).not.toBe(before);
    expect(after).toEqual(before);
  });
});
