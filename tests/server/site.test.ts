import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { auditEvents } from '../../db/tables';
import { startTestApp, type TestApp } from './harness';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

// ISO 4217 codes as the runtime's Intl knows them (Intl.supportedValuesOf('currency'), ECMA-402).
describe('the site currency', () => {
  it('starts as EUR, travels in the session, and the admin changes it (audited)', async () => {
    const admin = await t.signIn('admin');
    expect((await admin.get('/api/site')).body.currency).toBe('EUR');
    expect((await admin.get('/api/session')).body.user.siteCurrency).toBe('EUR');
    const r = await admin.patch('/api/site', { currency: 'chf' });
    expect(r.status).toBe(200);
    expect(r.body.currency).toBe('CHF');
    const engineer = await t.signIn('engineer');
    expect((await engineer.get('/api/session')).body.user.siteCurrency).toBe('CHF');
    const [event] = await t.db.select().from(auditEvents).where(eq(auditEvents.action, 'site.update')).execute();
    expect(event).toMatchObject({ oldValue: { currency: 'EUR' }, newValue: { currency: 'CHF' } });
    // The other site keeps its own.
    const other = await t.signIn('admin', 'other');
    expect((await other.get('/api/site')).body.currency).toBe('EUR');
  });

  it('refuses what is not a three-letter code the runtime knows, and anyone but an admin', async () => {
    const admin = await t.signIn('admin');
    for (const currency of ['EU', 'EURO', 'QQQ', '']) {
      const r = await admin.patch('/api/site', { currency });
      expect(r.status, currency).toBe(400);
      expect(r.body.error.fields.currency).toBeDefined();
    }
    expect((await admin.patch('/api/site', { currency: 'USD', timeZone: 'UTC' })).status).toBe(400);
    const supervisor = await t.signIn('supervisor');
    expect((await supervisor.patch('/api/site', { currency: 'USD' })).status).toBe(403);
  });
});
