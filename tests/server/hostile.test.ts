import fc from 'fast-check';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateDb, openDb, sqliteClient, type Db } from '../../db/client';
import { installationSecret } from '../../server/installation-secrets';
import { auditKeyOf, eventHash } from '../../server/services/audit';
import { appendCheckpoint } from '../../server/services/audit-checkpoints';
import { verifyAudit } from '../../server/services/audit-verify';
import { listAudit } from '../../server/repositories/audit';
import { findSubscription } from '../../server/repositories/billing';
import { listApiRoutes, type ApiRoute } from '../../server/route-table';
import { isCalendarDay } from '../../src/contracts/calendar-day';
import type { Role } from '../../src/contracts/roles';
import { startBillingTestApp } from './billing-harness';
import { email, onPostgres, password, startTestApp, type Client, type TestApp } from './harness';

// The hostile-input blocks run on both databases ("changes nothing": SQLite's total_changes(), on PostgreSQL a row
// trigger counting into a sequence). The blocks that tamper with rows through the SQLite connection (and the
// legacy chains, SQLite files by nature) run on SQLite only; on PostgreSQL the audit chain's verification of an
// edited or deleted event is covered by audit-events.test.ts and session.test.ts.
const sqliteInternals = onPostgres;

// Hostile input against every write route the app has (discovered, not listed): generated bodies and ids must
// never cause a 5xx or leak a stack trace or SQL, and a refused request must leave the database untouched.
const SEED = Number(process.env.HOSTILE_SEED ?? 424242);
const RUNS = Number(process.env.HOSTILE_RUNS ?? 100);

let t: TestApp;
const clients = new Map<Role, Client>();
let changes: () => Promise<number>;
beforeAll(async () => {
  t = await startTestApp();
  changes = onPostgres ? await pgChangeCounter(t.db) : async () => sqliteChanges();
});
afterAll(() => t.close());

const LEAK = /\bat [\w.<>]+ \(|node_modules|\.ts:\d+|SQLITE_|sqlite_master|SyntaxError|TypeError|ReferenceError|select .* from /i;

const nasty = fc.oneof(
  fc.constantFrom(
    "' or 1=1 --",
    '"; drop table users; --',
    "=cmd|'/c calc'!A1",
    '<script>alert(1)</script>',
    '../../etc/passwd',
    '\u0000',
    'NaN',
    'Infinity',
    '-1e309',
    '9'.repeat(400),
  ),
  fc.string({ maxLength: 40 }),
  fc.double(),
  fc.integer(),
  fc.boolean(),
  fc.constant(null),
);
const body = fc.oneof(
  fc.dictionary(
    fc.constantFrom(
      'name',
      'email',
      'role',
      'planId',
      'lotId',
      'recipeId',
      'batchH',
      'setpointC',
      'c',
      'h',
      'value',
      'password',
      'rows',
      'decision',
      'reason',
      'seats',
      'quantity',
      'meaning',
      'comment',
    ),
    nasty,
    { maxKeys: 6 },
  ),
  fc.anything({ maxDepth: 3 }),
  fc.array(nasty, { maxLength: 5 }),
);
const idValue = fc.constantFrom('1', '2', '0', '-1', '999999999', 'abc', '1%20or%201%3D1', '1e3', '%00');

// Rows written on this connection, not counting the audit trail: recording a refusal is a write we want.
const sqliteChanges = () => {
  const { n } = sqliteClient(t.db).prepare('select total_changes() as n').get() as { n: number };
  const { a } = sqliteClient(t.db).prepare('select count(*) as a from audit_events').get() as { a: number };
  return n - a;
};

/**
 * PostgreSQL's total_changes(): every row inserted, updated or deleted in any table but the audit trail, by any
 * connection, counted by a row trigger into a sequence (which, like total_changes(), keeps what a rolled-back
 * transaction wrote). Test-only objects in the test's own database.
 */
async function pgChangeCounter(db: Db): Promise<() => Promise<number>> {
  await db.execute(sql.raw('create sequence yp_test_changes'));
  await db.execute(
    sql.raw("create function yp_test_count() returns trigger language plpgsql as $$ begin perform nextval('yp_test_changes'); return null; end $$"),
  );
  const tables = await db.execute<{ name: string }>(
    sql`select table_name as name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' and table_name <> 'audit_events'`,
  );
  expect(tables.rows.length).toBeGreaterThan(10);
  for (const { name } of tables.rows)
    await db.execute(sql.raw(`create trigger yp_test_count after insert or update or delete on "${name}" for each row execute function yp_test_count()`));
  return async () => {
    const r = await db.execute<{ n: string }>(sql.raw('select case when is_called then last_value else 0 end as n from yp_test_changes'));
    return Number(r.rows[0]!.n);
  };
}

async function clientFor(route: ApiRoute): Promise<Client> {
  const role = (route.roles as Role[])[0]!;
  if (!clients.has(role)) clients.set(role, await t.signIn(role));
  return clients.get(role)!;
}

describe(`hostile input (seed ${SEED})`, () => {
  it('never answers 5xx or leaks internals, and refused writes change nothing', async () => {
    // Signing out is left to the session tests: it would end the caller's session half-way.
    const writes = listApiRoutes(t.mounts).filter((r) => r.method !== 'GET' && r.roles !== 'public' && r.roles !== null && r.path !== '/api/session');
    expect(writes.length).toBeGreaterThan(3);
    let sent = 0;
    for (const route of writes) {
      const c = await clientFor(route);
      await fc.assert(
        fc.asyncProperty(body, idValue, async (b, id) => {
          const path = route.path.replace(/:(\w+)/g, id);
          const before = await changes();
          const res = await c.req(route.method, path, b === undefined ? {} : b);
          sent++;
          const text = typeof res.body === 'string' ? res.body : JSON.stringify(res.body);
          if (res.status >= 500 || LEAK.test(text)) throw new Error(`${route.method} ${path} answered ${res.status}: ${text.slice(0, 300)}`);
          if (res.status >= 400 && (await changes()) !== before)
            throw new Error(`${route.method} ${path} refused with ${res.status} but wrote to the database`);
        }),
        { seed: SEED, numRuns: RUNS, verbose: 1 },
      );
    }
    console.log(`hostile input: ${sent} requests to ${writes.length} write routes`);
  }, 300_000);

  it('never lets a user of another site read or write this site’s records by id', async () => {
    const routes = listApiRoutes(t.mounts).filter((r) => r.path.includes(':') && r.roles !== 'public' && r.roles !== null);
    for (const route of routes) {
      const role = (route.roles as Role[])[0]!;
      const stranger = await t.signIn(role, 'other');
      // Ids 1-3 of every table belong to the first (main) site: it was seeded first.
      for (const id of ['1', '2', '3']) {
        const before = await changes();
        const res = await stranger.req(route.method, route.path.replace(/:(\w+)/g, id), route.method === 'GET' ? undefined : {});
        expect(res.status, `${role} of other site: ${route.method} ${route.path} id ${id}`).toBeGreaterThanOrEqual(400);
        expect(await changes(), `${route.method} ${route.path} wrote`).toBe(before);
      }
    }
  });
});

describe.skipIf(sqliteInternals)('refused calls cannot grow the audit trail without bound', () => {
  const audit = () =>
    sqliteClient(t.db).prepare('select action, actor, entity_id as entityId, new_value as newValue from audit_events order by id').all() as {
      action: string;
      actor: string;
      entityId: string;
      newValue: string;
    }[];
  const bytes = () =>
    (sqliteClient(t.db).pragma('page_count', { simple: true }) as number) * (sqliteClient(t.db).pragma('page_size', { simple: true }) as number);

  it('one address: the first denial of a minute is an event, the rest one counted event, with the path cut', async () => {
    t.clock.advanceMinutes(1);
    const before = audit().length;
    const grownFrom = bytes();
    const long = `/api/lots/${'a'.repeat(8000)}`;
    const anonymous = t.client();
    for (let i = 0; i < 300; i++) expect((await anonymous.get(long)).status).toBe(401);
    await new Promise((r) => setTimeout(r, 20));
    t.clock.advanceMinutes(1);
    expect((await anonymous.get('/api/users')).status).toBe(401);
    await new Promise((r) => setTimeout(r, 20));
    const added = audit().slice(before);
    expect(added.map((e) => e.action)).toEqual(['access.denied', 'access.denied.repeated', 'access.denied']);
    expect(added[0]!.entityId.length).toBeLessThan(250);
    expect(added[0]!.entityId).toMatch(/… \(8014 characters\)$/);
    expect(JSON.parse(added[1]!.newValue)).toMatchObject({ count: 299, statuses: { 401: 299 } });
    // 300 full rows of 8 KB each would be 2.4 MB.
    expect(bytes() - grownFrom).toBeLessThan(64 * 1024);
  });

  it('many spoofed addresses share one record beyond the per-minute limit of callers', async () => {
    t.clock.advanceMinutes(1);
    const before = audit().length;
    for (let i = 0; i < 400; i++) expect((await t.client().get('/api/lots', { 'x-forwarded-for': `10.0.${i >> 8}.${i & 255}` })).status).toBe(401);
    await new Promise((r) => setTimeout(r, 20));
    t.clock.advanceMinutes(1);
    expect((await t.client().get('/api/lots')).status).toBe(401);
    await new Promise((r) => setTimeout(r, 20));
    const added = audit().slice(before);
    // 100 callers one by one, one shared record for the other 300 (its first event and its count), the next minute's.
    expect(added.length).toBe(100 + 2 + 1);
    const shared = added.find((e) => e.action === 'access.denied.repeated')!;
    expect(shared.actor).toBe('more than 100 callers this minute');
    expect(JSON.parse(shared.newValue).count).toBe(299);
  });
});

describe('unknown keys', () => {
  it('every write route that reads a JSON body refuses a misspelt key by name and writes nothing', async () => {
    const writes = listApiRoutes(t.mounts).filter((r) => r.method !== 'GET' && r.method !== 'DELETE' && r.roles !== 'public' && r.roles !== null);
    const named: string[] = [];
    for (const route of writes) {
      const c = await clientFor(route);
      // The tests above moved the clock on: let the session's idle-timeout touch (a write) happen first.
      await c.get('/api/session');
      const before = await changes();
      const res = await c.req(route.method, route.path.replace(/:(\w+)/g, '1'), { zzMisspeltKey: 1 });
      // Routes that take a file (CSV text, a multipart upload) say so under `file` instead.
      if (res.status !== 400 || res.body?.error?.code !== 'invalid_input' || 'file' in (res.body.error.fields ?? {})) continue;
      expect(res.body.error.fields, `${route.method} ${route.path}`).toHaveProperty('zzMisspeltKey');
      expect(await changes()).toBe(before);
      named.push(`${route.method} ${route.path}`);
    }
    console.log(`unknown key refused by name on ${named.length} of ${writes.length} write routes`);
    expect(named.length).toBeGreaterThan(15);
  });

  it('signing in refuses an unknown key by name', async () => {
    const res = await t.client().post('/api/session', { email: 'admin@haldenbay.test', password: 'x'.repeat(12), remember: true });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.remember).toMatch(/Unknown field "remember"/);
  });
});

describe('text that is not well-formed Unicode', () => {
  it.each([
    [
      'a vessel name',
      '/api/vessels',
      { name: 'tank\ud800end', workingVolumeL: 500, minC: 10, maxC: 90, maxHeatCPerH: 20, maxCoolCPerH: 15, hygienicMinC: 40 },
      'name',
    ],
    ['a change rationale', '/api/change-requests', { planId: 1, rationale: 'Because \udc00 of this', expectedEffect: 'More product' }, 'rationale'],
    ['a nested key', '/api/plans', { uncertainty: { ['seed\ud83d']: 1 } }, 'uncertainty.seed\ud83d'],
  ])('refuses a lone surrogate in %s at the boundary, naming the field, and writes nothing', async (_label, path, body, field) => {
    const c = await t.signIn('engineer');
    const before = await changes();
    const res = await c.post(path, body);
    expect(res.status).toBe(400);
    expect(res.body.error.fields[field]).toMatch(/unpaired surrogate/);
    expect(await changes()).toBe(before);
  });

  it('keeps well-formed text outside the basic plane (a surrogate pair)', async () => {
    const c = await t.signIn('engineer');
    const before = await changes();
    const res = await c.post('/api/vessels', {
      name: 'Tank 🌾 7',
      workingVolumeL: 500,
      minC: 10,
      maxC: 90,
      maxHeatCPerH: 20,
      maxCoolCPerH: 15,
      hygienicMinC: 40,
    });
    expect(res.status).toBe(201);
    expect(res.body.name).toBe('Tank 🌾 7');
    // The change counter the refusals above rely on sees a write that was made.
    expect(await changes()).toBeGreaterThan(before);
  });
});

describe('a stranger guessing passwords cannot lock the account out', () => {
  it('wrong passwords from many addresses slow the stranger, never the account’s own browser', async () => {
    const app = await startTestApp({ signInLimit: { perAddress: 1000, perAccount: 5, windowMs: 15 * 60_000, maxDelayMs: 60_000 } });
    try {
      const login = (headers: Record<string, string>, pw: string) =>
        fetch(`${app.base}/api/session`, {
          method: 'POST',
          headers: { 'content-type': 'application/json', 'x-yieldpoint-client': 'test', ...headers },
          body: JSON.stringify({ email: email('supervisor'), password: pw }),
        });
      // The supervisor's browser signed in yesterday and keeps its device cookie.
      const first = await login({}, password('supervisor'));
      expect(first.status).toBe(201);
      const device = first.headers
        .getSetCookie()
        .find((c) => c.startsWith('yp_device='))!
        .split(';')[0]!;
      // A stranger sprays guesses at the account from 200 spoofed addresses, keeping pace with the slow-down.
      let wrong = 0;
      let slowed = 0;
      for (let i = 0; i < 200; i++) {
        const r = await login({ 'x-forwarded-for': `10.9.${i >> 8}.${i & 255}` }, `guess-${i}`);
        if (r.status === 401) wrong++;
        else if (r.status === 429) slowed++;
        if (i % 20 === 19) app.clock.advanceMinutes(1);
      }
      // Ten minutes of spraying bought 5 free guesses plus about one a minute at the cap.
      expect(wrong).toBeLessThan(25);
      expect(slowed).toBeGreaterThan(170);
      await login({ 'x-forwarded-for': '10.9.9.9' }, 'one-more-guess');
      // A browser without the device cookie (or a forged one) waits at most the cap, told how long and what to do.
      for (const cookie of [undefined, 'yp_device=abc.def']) {
        const fresh = await login(cookie ? { cookie } : {}, password('supervisor'));
        expect(fresh.status).toBe(429);
        expect(Number(fresh.headers.get('retry-after'))).toBeLessThanOrEqual(60);
        expect(((await fresh.json()) as { error: { message: string } }).error.message).toMatch(/reset link/);
      }
      // The account's own browser signs in at once.
      expect((await login({ cookie: device }, password('supervisor'))).status).toBe(201);
    } finally {
      await app.close();
    }
  });
});

describe('payment events cannot be forged in the default set-up', () => {
  it('each installation has its own webhook secret (kept across restarts), never the source’s', async () => {
    const [a, b] = [fs.mkdtempSync(path.join(os.tmpdir(), 'yp-inst-')), fs.mkdtempSync(path.join(os.tmpdir(), 'yp-inst-'))];
    const secretA = installationSecret(a, '.webhook-secret');
    expect(installationSecret(a, '.webhook-secret').equals(secretA)).toBe(true);
    expect(installationSecret(b, '.webhook-secret').equals(secretA)).toBe(false);
    expect(secretA.length).toBe(32);
    expect(fs.statSync(path.join(a, '.webhook-secret')).mode & 0o077).toBe(0);
  });

  it('refuses events signed with the former constant, seeds unguessable customer ids, and keeps no foreign pay link', async () => {
    const app = await startBillingTestApp();
    try {
      const row = (await findSubscription(app.db, 1))!;
      const other = (await findSubscription(app.db, 2))!;
      expect(row.stripeCustomerId).not.toMatch(/site1$/);
      expect(row.stripeCustomerId).not.toBe(other.stripeCustomerId!.replace(/2$/, '1'));
      const event = (type: string, object: object) => ({
        id: `evt_forged_${type}`,
        object: 'event',
        api_version: '2026-02-25.clover',
        created: Math.floor(Date.now() / 1000),
        type,
        data: { object },
        livemode: false,
        pending_webhooks: 1,
        request: { id: null, idempotency_key: null },
      });
      const deliver = (e: object, secret: string) => {
        const payload = JSON.stringify(e);
        const header = app.billing.stripe.webhooks.generateTestHeaderString({ payload, secret });
        return fetch(`${app.base}/api/billing/webhook`, {
          method: 'POST',
          headers: { 'content-type': 'application/json', 'stripe-signature': header },
          body: payload,
        });
      };
      const sub = structuredClone(app.fake.get(row.stripeSubscriptionId!)!);
      sub.items.data[0].quantity = 500;
      expect((await deliver(event('customer.subscription.updated', sub), 'whsec_yieldpoint_local_fake_secret')).status).toBe(400);
      expect((await findSubscription(app.db, 1))!.seats).toBe(row.seats);

      // Even a correctly signed invoice keeps only a link to the provider's own payment page.
      const now = Math.floor(Date.now() / 1000);
      const invoice = {
        id: 'in_forged_1',
        object: 'invoice',
        customer: row.stripeCustomerId,
        number: 'X-1',
        status: 'open',
        currency: 'eur',
        amount_due: 100,
        amount_paid: 0,
        lines: { object: 'list', data: [], has_more: false },
        period_start: now,
        period_end: now,
        created: now,
        hosted_invoice_url: 'https://pay.example.net/steal',
      };
      expect((await deliver(event('invoice.finalized', invoice), app.billing.webhookSecret)).status).toBe(200);
      const admin = await app.signIn('admin');
      const stored = (await admin.get('/api/billing/invoices')).body.invoices.find((i: { number: string }) => i.number === 'X-1');
      expect(stored.payUrl).toBeNull();
      expect((await listAudit(app.db, 1, { action: 'billing.pay-link.refused' }))[0]!.newValue).toEqual({ host: 'pay.example.net' });
    } finally {
      await app.closeAll();
    }
  });
});

describe('dates are calendar dates', () => {
  // Days per month by the Gregorian rule (ISO 8601's calendar): leap years divisible by 4, not by 100 unless by 400.
  const daysIn = (y: number, m: number) => [31, y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1]!;
  it('accepts exactly the days the calendar has (generated years, months 0-19, days 0-39)', () => {
    const pad = (n: number, w: number) => String(n).padStart(w, '0');
    fc.assert(
      fc.property(fc.integer({ min: 1000, max: 9999 }), fc.integer({ min: 0, max: 19 }), fc.integer({ min: 0, max: 39 }), (y, m, d) => {
        const real = m >= 1 && m <= 12 && d >= 1 && d <= daysIn(y, m);
        return isCalendarDay(`${y}-${pad(m, 2)}-${pad(d, 2)}`) === real;
      }),
      { seed: SEED, numRuns: 5000 },
    );
    expect(isCalendarDay('2024-02-29')).toBe(true);
    expect(isCalendarDay('2100-02-29')).toBe(false);
    expect(isCalendarDay('2000-02-29')).toBe(true);
  });
});

describe.skipIf(sqliteInternals)('the audit trail cannot be rewritten without a trace', () => {
  let a: TestApp;
  let admin: Client;
  const verify = async () => (await admin.get('/api/audit-events/verify')).body;
  const seal = async () => expect((await admin.post('/api/audit-events/checkpoints', {})).status).toBe(201);
  const raw = () => sqliteClient(a.db);
  beforeAll(async () => {
    a = await startTestApp();
    admin = await a.signIn('admin');
  });
  afterAll(() => a.close());

  it('an edited event, its later links recomputed without the key, is found', async () => {
    const eng = await a.signIn('engineer');
    await eng.get('/api/session');
    const rows = raw().prepare('select * from audit_events where site_id = 1 order by id').all() as any[];
    expect(rows.length).toBeGreaterThanOrEqual(2);
    // The attacker knows the published recipe (plain SHA-256 over the same fields) but not the key.
    const link = (r: any, prev: string) =>
      crypto
        .createHash('sha256')
        .update(
          JSON.stringify([
            r.site_id,
            r.user_id,
            r.actor,
            r.action,
            r.entity,
            r.entity_id,
            r.old_value == null ? null : JSON.parse(r.old_value),
            r.new_value == null ? null : JSON.parse(r.new_value),
            r.at,
            prev,
          ]),
        )
        .digest('hex');
    const snapshot = rows.map((r) => ({ ...r }));
    let prev = rows[0].prev_hash;
    rows[0].actor = 'someone-else@haldenbay.test';
    for (const r of rows) {
      const h = link(r, prev);
      raw().prepare('update audit_events set actor = ?, prev_hash = ?, hash = ? where id = ?').run(r.actor, prev, h, r.id);
      prev = h;
    }
    expect(await verify()).toMatchObject({ ok: false, firstBrokenId: rows[0].id });
    for (const r of snapshot) raw().prepare('update audit_events set actor = ?, prev_hash = ?, hash = ? where id = ?').run(r.actor, r.prev_hash, r.hash, r.id);
    expect((await verify()).ok).toBe(true);
  });

  it('deleting the newest events is found against the signed checkpoint; a rebuilt chain even with the key', async () => {
    await seal();
    const before = await verify();
    expect(before).toMatchObject({ ok: true, checkpoints: 1 });
    const kept = raw().prepare('select * from audit_events where site_id = 1 order by id desc limit 2').all() as any[];
    raw().prepare('delete from audit_events where id in (?, ?)').run(kept[0].id, kept[1].id);
    const after = await verify();
    expect(after.firstBrokenId).toBeNull(); // the links that are left are whole
    expect(after.ok).toBe(false);
    expect(after.problems[0]).toMatchObject({ kind: 'checkpoint', eventId: kept[0].id });
    const put = raw().prepare(
      'insert into audit_events (id, site_id, user_id, actor, action, entity, entity_id, old_value, new_value, at, prev_hash, hash) values (@id, @site_id, @user_id, @actor, @action, @entity, @entity_id, @old_value, @new_value, @at, @prev_hash, @hash)',
    );
    for (const r of kept.reverse()) put.run(r);
    expect((await verify()).ok).toBe(true);

    // Someone holding the key edits the newest sealed event and recomputes its link: the chain passes, the checkpoint does not.
    const head = raw().prepare('select * from audit_events where site_id = 1 order by id desc limit 1').get() as any;
    const edited = {
      siteId: 1,
      userId: head.user_id,
      actor: 'forger@haldenbay.test',
      action: head.action,
      entity: head.entity,
      entityId: head.entity_id,
      oldValue: head.old_value == null ? null : JSON.parse(head.old_value),
      newValue: head.new_value == null ? null : JSON.parse(head.new_value),
      at: head.at,
      prevHash: head.prev_hash,
    };
    raw()
      .prepare('update audit_events set actor = ?, hash = ? where id = ?')
      .run(edited.actor, eventHash(auditKeyOf(a.db), edited), head.id);
    const rebuilt = await verify();
    expect(rebuilt.firstBrokenId).toBeNull();
    expect(rebuilt.problems.map((p: { kind: string }) => p.kind)).toEqual(['checkpoint']);
    raw().prepare('update audit_events set actor = ?, hash = ? where id = ?').run(head.actor, head.hash, head.id);
  });

  it('a forged checkpoint line is reported, not trusted', async () => {
    appendCheckpoint(a.db, crypto.randomBytes(32), { siteId: 1, events: 1, lastId: 1, head: 'f'.repeat(64), at: a.clock.now().toISOString() });
    expect((await verify()).problems).toEqual([{ kind: 'checkpoint', eventId: null, message: '1 checkpoint line does not carry a valid signature' }]);
  });

  it('edited business rows are found against their last audited state: a lot decision, a printed name, a change request', async () => {
    // Start from a clean slate of checkpoints for this site (the forged line above stays reported otherwise).
    const fresh = await startTestApp();
    try {
      const [proc, eng, sup, adm] = await Promise.all([
        fresh.signIn('procurement'),
        fresh.signIn('engineer'),
        fresh.signIn('supervisor'),
        fresh.signIn('admin'),
      ]);
      const check = async () => (await adm.get('/api/audit-events/verify')).body;
      const lot = ((await proc.get('/api/lots')).body.lots as { id: number; status: string }[]).find((l) => l.status === 'quarantined')!;
      expect((await proc.post(`/api/lots/${lot.id}/decision`, { decision: 'reject', reason: 'Half-life below specification' })).status).toBe(200);
      const rec = (await eng.get(`/api/recipes/${((await eng.get('/api/recipes')).body.recipes as { id: number }[])[0]!.id}`)).body.recipe;
      const plan = (
        await eng.post('/api/plans', {
          recipeId: rec.id,
          lotId: rec.lotId,
          batchH: rec.batchH,
          turnaroundH: rec.turnaroundH,
          doseGPerL: rec.doseGPerL,
          s0GPerL: rec.s0GPerL,
          kmGPerL: rec.kmGPerL,
          productPricePerKg: rec.productPricePerKg,
          enzymePricePerKg: rec.enzymePricePerKg,
          heatingCostPerDegCHour: rec.heatingCostPerDegCHour,
          currentSetpointC: rec.currentSetpointC,
          strategy: 'isothermal',
          stages: 3,
          maxStepC: 3,
          uncertainty: null,
        })
      ).body;
      const cr = (
        await eng.post('/api/change-requests', {
          planId: plan.id,
          rationale: 'The assays support a warmer setpoint.',
          expectedEffect: 'More product',
          effectiveFrom: '2026-12-20',
        })
      ).body;
      expect(
        (await sup.post(`/api/change-requests/${cr.id}/signatures`, { password: password('supervisor'), meaning: 'rejected', comment: 'Not yet' })).status,
      ).toBe(201);
      expect(await check()).toMatchObject({ ok: true, problems: [] });
      const db = sqliteClient(fresh.db);
      db.prepare("update lots set status = 'accepted', decision_reason = 'Meets specification' where id = ?").run(lot.id);
      db.prepare("update signatures set printed_name = 'Somebody Else' where change_request_id = ?").run(cr.id);
      db.prepare("update change_requests set status = 'approved' where id = ?").run(cr.id);
      const found = await check();
      expect(found.ok).toBe(false);
      expect(found.firstBrokenId).toBeNull();
      const messages = found.problems.map((p: { message: string }) => p.message).join('\n');
      expect(messages).toMatch(/reads accepted \("Meets specification"\); its audited decision was rejected/);
      expect(messages).toMatch(/printedName reads "Somebody Else", signed as "Marit Oyelaran"/);
      expect(messages).toMatch(new RegExp(`Change request ${cr.id} reads approved; its last audited state is rejected`));
    } finally {
      await fresh.close();
    }
  });
});

describe.skipIf(sqliteInternals)('databases written before the chain was keyed', () => {
  it('re-links a whole legacy chain once with the key (audited), and leaves a broken one reported', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yp-legacy-'));
    const file = path.join(dir, 'yieldpoint.db');
    const first = openDb(file);
    await migrateDb(first);
    const sha = (e: unknown[]) => crypto.createHash('sha256').update(JSON.stringify(e)).digest('hex');
    const ins = sqliteClient(first).prepare(
      'insert into audit_events (site_id, user_id, actor, action, entity, entity_id, old_value, new_value, at, prev_hash, hash) values (?, null, ?, ?, ?, null, null, null, ?, ?, ?)',
    );
    // Site-less chain: whole. Written as the earlier code did (plain SHA-256 links).
    let prev = '0'.repeat(64);
    for (let i = 0; i < 5; i++) {
      const at = new Date(Date.UTC(2026, 10, 1, 8, i)).toISOString();
      const h = sha([null, null, `u${i}@x.test`, 'sign-in.failed', 'session', null, null, null, at, prev]);
      ins.run(null, `u${i}@x.test`, 'sign-in.failed', 'session', at, prev, h);
      prev = h;
    }
    sqliteClient(first).close();
    fs.rmSync(path.join(dir, '.audit-key'), { force: true });

    const second = openDb(file);
    const result = await verifyAudit(second, null);
    expect(result).toMatchObject({ ok: true, events: 6, firstBrokenId: null });
    const last = sqliteClient(second).prepare('select action, new_value as v from audit_events order by id desc limit 1').get() as {
      action: string;
      v: string;
    };
    expect(last.action).toBe('audit.rekeyed');
    expect(JSON.parse(last.v)).toEqual({ events: 5 });
    expect(fs.existsSync(path.join(dir, '.audit-key'))).toBe(true);
    sqliteClient(second).close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('does not re-link a legacy chain that is already broken (the break stays visible)', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yp-legacy-'));
    const file = path.join(dir, 'yieldpoint.db');
    const first = openDb(file);
    await migrateDb(first);
    const sha = (e: unknown[]) => crypto.createHash('sha256').update(JSON.stringify(e)).digest('hex');
    const ins = sqliteClient(first).prepare(
      'insert into audit_events (site_id, user_id, actor, action, entity, entity_id, old_value, new_value, at, prev_hash, hash) values (null, null, ?, ?, ?, null, null, null, ?, ?, ?)',
    );
    let prev = '0'.repeat(64);
    for (let i = 0; i < 4; i++) {
      const at = new Date(Date.UTC(2026, 10, 1, 8, i)).toISOString();
      const h = sha([null, null, `u${i}@x.test`, 'sign-in.failed', 'session', null, null, null, at, prev]);
      ins.run(`u${i}@x.test`, 'sign-in.failed', 'session', at, prev, h);
      prev = h;
    }
    sqliteClient(first).prepare("update audit_events set actor = 'edited@x.test' where id = 2").run();
    sqliteClient(first).close();
    const second = openDb(file);
    expect(await verifyAudit(second, null)).toMatchObject({ ok: false, events: 4, firstBrokenId: 1 });
    sqliteClient(second).close();
    fs.rmSync(dir, { recursive: true, force: true });
  });
});

describe('reset links', () => {
  it('a session token, a token for another purpose or a tampered one never sets a password', async () => {
    const c = await t.signIn('operator');
    const sessionJwt = decodeURIComponent(c.cookie!.split('=')[1]!);
    for (const token of [sessionJwt, `${sessionJwt.split('.').slice(0, 2).join('.')}.${'A'.repeat(43)}`, 'x'.repeat(40)]) {
      const before = await changes();
      const res = await t.client().post('/api/password-resets', { token, password: 'taken-over-password' });
      expect(res.status).toBe(404);
      expect(await changes()).toBe(before);
    }
    expect((await t.client().post('/api/session', { email: email('operator'), password: 'taken-over-password' })).status).toBe(401);
  });
});
