import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { writeTx } from '../../db/client';
import { rawSql } from '../support/raw-sql';
import { csvCell, toCsv } from '../../server/csv';
import { appendAudit } from '../../server/services/audit';
import { email, startTestApp, type TestApp } from './harness';

let t: TestApp;
beforeEach(async () => {
  t = await startTestApp();
});
afterEach(() => t.close());

describe('audit trail API', () => {
  it('lists the site’s events newest first, filtered by action, and never another site’s', async () => {
    const sup = await t.signIn('supervisor');
    await t.signIn('engineer', 'other');
    await t.client().post('/api/session', { email: email('operator'), password: 'wrong' });
    const all = await sup.get('/api/audit-events');
    expect(all.status).toBe(200);
    expect(all.body.events.map((e: { action: string }) => e.action)).toEqual(['sign-in.failed', 'sign-in']);
    expect(all.body.events.every((e: { actor: string }) => !e.actor.endsWith('otherplant.test'))).toBe(true);
    const failed = await sup.get('/api/audit-events?action=sign-in.failed');
    expect(failed.body.total).toBe(1);
    expect(failed.body.events[0].actor).toBe(email('operator'));
  });

  it('refuses a bad filter with field errors', async () => {
    const sup = await t.signIn('supervisor');
    const r = await sup.get('/api/audit-events?limit=0&from=yesterday');
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['from', 'limit']);
  });

  it('verifies the chain, then names the first event whose row was edited in the database', async () => {
    const admin = await t.signIn('admin');
    await t.signIn('engineer');
    await t.signIn('operator');
    expect((await admin.get('/api/audit-events/verify')).body).toMatchObject({ ok: true, events: 3 });
    const events = (await admin.get('/api/audit-events')).body.events as { id: number }[];
    const middle = events[1]!.id;
    await rawSql(t.db, `update audit_events set new_value = '{"from":"elsewhere"}' where id = ?`, middle);
    expect((await admin.get('/api/audit-events/verify')).body).toMatchObject({ ok: false, events: 3, firstBrokenId: middle });
  });

  it('answers other requests while it verifies a long chain, a part at a time', async () => {
    const admin = await t.signIn('admin');
    // 20,000 invented events on the site's chain (a fifth of the 100,000 that held the server for 3 s in one turn).
    await writeTx(t.db, async (tx) => {
      for (let i = 0; i < 20_000; i++)
        await appendAudit(tx, {
          siteId: 1,
          userId: null,
          actor: 'load@example.test',
          action: 'test.event',
          entity: 'test',
          entityId: i,
          newValue: { i },
          at: t.clock.now(),
        });
    });
    let verified = false;
    const verify = admin.get('/api/audit-events/verify').finally(() => (verified = true));
    // Other requests, one after another, while the verify runs: at least one is answered before it finishes.
    const answeredMeanwhile: number[] = [];
    while (!verified) {
      const r = await admin.get('/api/session');
      if (!verified) answeredMeanwhile.push(r.status);
    }
    expect((await verify).body).toMatchObject({ ok: true });
    expect((await verify).body.events).toBeGreaterThan(20_000);
    expect(answeredMeanwhile.length).toBeGreaterThan(0);
    expect(answeredMeanwhile.every((st) => st === 200)).toBe(true);
  }, 120_000);

  it('detects a deleted event by the broken link of the next one', async () => {
    const admin = await t.signIn('admin');
    await t.signIn('engineer');
    await t.signIn('operator');
    const ids = ((await admin.get('/api/audit-events')).body.events as { id: number }[]).map((e) => e.id).reverse();
    await rawSql(t.db, 'delete from audit_events where id = ?', ids[1]);
    expect((await admin.get('/api/audit-events/verify')).body).toMatchObject({ ok: false, events: 2, firstBrokenId: ids[2] });
  });

  it('exports CSV with hashes, oldest first, every cell safe for a spreadsheet', async () => {
    const admin = await t.signIn('admin');
    const users = (await admin.get('/api/users')).body.users as { id: number; role: string }[];
    const op = users.find((u) => u.role === 'operator')!;
    await admin.patch(`/api/users/${op.id}`, { name: '=2+3' });
    const r = await admin.get('/api/audit-events/export.csv');
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toMatch(/text\/csv/);
    expect(r.headers.get('content-disposition')).toMatch(/attachment; filename="?audit-trail-2026-12-01.csv/);
    const lines = (r.body as string).trim().split('\r\n');
    expect(lines[0]).toBe('id,at_utc,actor,action,entity,entity_id,old_value,new_value,prev_hash,hash');
    expect(lines.slice(1).map((l) => l.split(',')[3])).toEqual(['sign-in', 'user.update']);
    expect(lines[2]).toContain('=2+3');
    expect(lines.every((l) => l.split(',').every((cell) => !/^[=+@]/.test(cell)))).toBe(true);
  });
});

describe('csv cells (OWASP CSV injection guidance; RFC 4180 quoting)', () => {
  it.each([
    ['=1+2', "'=1+2"],
    ['+41 79', "'+41 79"],
    ['-3', "'-3"],
    ['@SUM(A1)', "'@SUM(A1)"],
    ['plain', 'plain'],
    ['a,b', '"a,b"'],
    ['say "hi"', '"say ""hi"""'],
    ['=HYPERLINK("x")', `"'=HYPERLINK(""x"")"`],
  ])('%s -> %s', (input, expected) => {
    expect(csvCell(input)).toBe(expected);
  });

  it('keeps numbers as numbers, negative ones included', () => {
    expect(toCsv(['x'], [[-3.5], [0]])).toBe('x\r\n-3.5\r\n0\r\n');
  });
});
