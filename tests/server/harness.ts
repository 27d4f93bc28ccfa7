import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { closeDb, migrateDb, openDb, type Db } from '../../db/client';
import { openPgDb } from '../../db/pg/client';
import { databaseDialect } from '../../db/tables';
import { freshPgDatabase } from '../support/pg-database';
import { DEMO_USERS, seedDemo } from '../../db/seed';
import { createApp, type AppDeps } from '../../server/app';
import type { Clock } from '../../server/clock';
import type { ApiMount } from '../../server/route-table';
import type { Role } from '../../src/contracts/roles';

/** A clock tests can move. */
export class TestClock implements Clock {
  constructor(private t = Date.parse('2026-12-01T08:00:00Z')) {}
  now = () => new Date(this.t);
  advanceMinutes(m: number) {
    this.t += m * 60_000;
  }
}

export type Reply = { status: number; body: any; headers: Headers };

/** A browser-like caller: keeps the session cookie and sends the client header on writes. */
export class Client {
  cookie: string | null = null;
  constructor(private base: string) {}
  async req(method: string, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<Reply> {
    const h: Record<string, string> = { 'x-yieldpoint-client': 'test', ...headers };
    if (this.cookie) h.cookie = this.cookie;
    let payload: string | undefined;
    if (body !== undefined) {
      h['content-type'] ??= 'application/json';
      payload = typeof body === 'string' ? body : JSON.stringify(body);
    }
    const res = await fetch(this.base + path, { method, headers: h, body: payload });
    const setCookie = res.headers.get('set-cookie');
    if (setCookie) {
      const pair = setCookie.split(';')[0]!;
      this.cookie = pair.endsWith('=') ? null : pair;
    }
    const text = await res.text();
    let parsed: unknown = text;
    try {
      parsed = text ? JSON.parse(text) : null;
    } catch {
      /* non-JSON bodies stay text */
    }
    return { status: res.status, body: parsed, headers: res.headers };
  }
  get = (p: string, h?: Record<string, string>) => this.req('GET', p, undefined, h);
  post = (p: string, b?: unknown, h?: Record<string, string>) => this.req('POST', p, b ?? {}, h);
  patch = (p: string, b?: unknown, h?: Record<string, string>) => this.req('PATCH', p, b ?? {}, h);
  del = (p: string, h?: Record<string, string>) => this.req('DELETE', p, undefined, h);
}

export type TestApp = {
  db: Db;
  clock: TestClock;
  base: string;
  mounts: ApiMount[];
  client(): Client;
  signIn(role: Role, site?: 'main' | 'other'): Promise<Client>;
  close(): Promise<void>;
};

export const password = (role: Role) => DEMO_USERS.find((u) => u.role === role)!.password;
export const email = (role: Role, site: 'main' | 'other' = 'main') =>
  DEMO_USERS.find((u) => u.role === role)!.email.replace('haldenbay.test', site === 'main' ? 'haldenbay.test' : 'otherplant.test');

/** True in the `server-pg` test project: the same tests on PostgreSQL. */
export const onPostgres = databaseDialect === 'postgres';

/**
 * The test's database, migrated and empty: SQLite in memory (or the file `file`), or in the `server-pg` project a
 * fresh PostgreSQL database of the run's cluster (its installation files in a temporary folder).
 */
export async function openTestDb(file?: string): Promise<Db> {
  if (onPostgres) return openPgDb(await freshPgDatabase(), { dataDir: fs.mkdtempSync(path.join(os.tmpdir(), 'yp-pg-installation-')), max: 4 });
  const db = openDb(file ?? ':memory:');
  await migrateDb(db);
  return db;
}

/**
 * The app on an in-memory database (or the SQLite file `opts.file`) with the demo site and a second site,
 * listening on a free port.
 */
export async function startTestApp(
  overrides: Partial<AppDeps> = {},
  opts: { file?: string; now?: Date; controlLink?: (db: Db, clock: TestClock) => AppDeps['controlLink'] } = {},
): Promise<TestApp> {
  const db = await openTestDb(opts.file);
  // Cost 4 keeps seeding fast; the production cost is checked on its own. With `now`, the running batch is
  // seeded to have started four hours before it and the clock starts there.
  await seedDemo(db, { bcryptCost: 4, now: opts.now });
  await seedDemo(db, { bcryptCost: 4, siteName: 'Other Plant', emailDomain: 'otherplant.test', now: opts.now });
  const clock = opts.now ? new TestClock(opts.now.getTime()) : new TestClock();
  return serveTestApp(db, clock, { controlLink: opts.controlLink?.(db, clock), ...overrides });
}

/**
 * The app on a database already migrated and seeded, listening on a free port; `close` closes the database too.
 * Two of them on one PostgreSQL database (each with its own handle) stand for two server processes.
 */
export async function serveTestApp(db: Db, clock: TestClock, overrides: Partial<AppDeps> = {}): Promise<TestApp> {
  const app = createApp({
    db,
    clock,
    auth: { secret: new TextEncoder().encode('test-secret-of-at-least-32-bytes!!'), idleMinutes: 60, absoluteHours: 24 },
    signInLimit: { perAddress: 1000, perAccount: 1000, windowMs: 60_000 },
    ...overrides,
  });
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const client = () => new Client(base);
  return {
    db,
    clock,
    base,
    mounts: app.locals.apiMounts as ApiMount[],
    client,
    async signIn(role, site = 'main') {
      const c = client();
      const r = await c.post('/api/session', { email: email(role, site), password: password(role) });
      if (r.status !== 201) throw new Error(`sign-in as ${role} failed: ${r.status} ${JSON.stringify(r.body)}`);
      return c;
    },
    close: async () => {
      await new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      });
      await closeDb(db);
    },
  };
}
