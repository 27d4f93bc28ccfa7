import { rawSql } from '../support/raw-sql';
import bcrypt from 'bcryptjs';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { verifyAudit } from '../../server/services/audit-verify';
import { BCRYPT_COST, hashPassword } from '../../server/services/auth';
import { listAudit } from '../../server/repositories/audit';
import { email, password, startTestApp, type TestApp } from './harness';

let t: TestApp;
beforeEach(async () => {
  t = await startTestApp();
});
afterEach(() => t.close());

describe('sign-in', () => {
  it('opens a session with an httpOnly, SameSite=Strict cookie and returns the user without secrets', async () => {
    const c = t.client();
    const r = await c.post('/api/session', { email: email('engineer'), password: password('engineer') });
    expect(r.status).toBe(201);
    const cookie = r.headers.get('set-cookie')!;
    expect(cookie).toMatch(/^yp_session=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Strict/i);
    expect(r.body.user).toMatchObject({ email: email('engineer'), role: 'engineer', siteName: 'Halden Bay Biorefinery' });
    expect(JSON.stringify(r.body)).not.toMatch(/password|hash/i);
    const me = await c.get('/api/session');
    expect(me.body.user.role).toBe('engineer');
  });

  it('accepts the e-mail in any case and with spaces around it', async () => {
    const r = await t.client().post('/api/session', { email: `  ${email('operator').toUpperCase()} `, password: password('operator') });
    expect(r.status).toBe(201);
  });

  it('refuses a wrong password with 401 and audits the failure', async () => {
    const r = await t.client().post('/api/session', { email: email('engineer'), password: 'not-it' });
    expect(r.status).toBe(401);
    expect(r.body.error.code).toBe('bad_credentials');
    const failed = (await listAudit(t.db, 1)).filter((e) => e.action === 'sign-in.failed');
    expect(failed).toHaveLength(1);
    expect(failed[0]!.actor).toBe(email('engineer'));
  });

  it('answers an unknown e-mail exactly like a wrong password', async () => {
    const unknown = await t.client().post('/api/session', { email: 'nobody@haldenbay.test', password: 'x' });
    const wrong = await t.client().post('/api/session', { email: email('engineer'), password: 'x' });
    expect(unknown.status).toBe(401);
    expect(unknown.body).toEqual(wrong.body);
  });

  it('refuses a deactivated user', async () => {
    const admin = await t.signIn('admin');
    const users = (await admin.get('/api/users')).body.users as { id: number; role: string }[];
    const op = users.find((u) => u.role === 'operator')!;
    expect((await admin.patch(`/api/users/${op.id}`, { isActive: false })).status).toBe(200);
    const r = await t.client().post('/api/session', { email: email('operator'), password: password('operator') });
    expect(r.status).toBe(401);
  });

  it('reports field errors for a malformed request and a password over 72 bytes', async () => {
    const r = await t.client().post('/api/session', { email: 'not-an-email', password: '' });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields).sort()).toEqual(['email', 'password']);
    const long = await t.client().post('/api/session', { email: email('admin'), password: 'é'.repeat(37) });
    expect(long.status).toBe(400);
    expect(long.body.error.fields.password).toMatch(/72 bytes/);
  });

  it('hashes new passwords with bcrypt cost 12', async () => {
    const hash = await hashPassword('a-new-password');
    expect(BCRYPT_COST).toBe(12);
    expect(bcrypt.getRounds(hash)).toBe(12);
    expect(await bcrypt.compare('a-new-password', hash)).toBe(true);
  });
});

describe('sign-in limits (failures only, slow-down per account)', () => {
  const signInAs = (c: ReturnType<TestApp['client']>, role: Parameters<typeof email>[0], pw = password(role)) =>
    c.post('/api/session', { email: email(role), password: pw });

  it('never counts successful sign-ins: ten right passwords in a row all open a session', async () => {
    await t.close();
    t = await startTestApp({ signInLimit: { perAddress: 3, perAccount: 3, windowMs: 60_000 } });
    for (let i = 0; i < 10; i++) expect((await signInAs(t.client(), 'supervisor')).status).toBe(201);
  });

  it('slows one account down progressively after its free failures (1 s, 2 s, 4 s ... up to the cap), then lets the right password in', async () => {
    await t.close();
    t = await startTestApp({ signInLimit: { perAddress: 1000, perAccount: 3, windowMs: 15 * 60_000, maxDelayMs: 8000 } });
    const c = t.client();
    for (let i = 0; i < 3; i++) expect((await signInAs(c, 'supervisor', 'guess')).status).toBe(401);
    const waits: number[] = [];
    for (let i = 0; i < 5; i++) {
      const slowed = await signInAs(c, 'supervisor', 'guess');
      expect(slowed.status).toBe(429);
      expect(slowed.body.error.message).toMatch(/reset link/);
      const wait = Number(slowed.headers.get('retry-after'));
      waits.push(wait);
      t.clock.advanceMinutes(wait / 60);
      expect((await signInAs(c, 'supervisor', 'guess')).status).toBe(401);
    }
    expect(waits).toEqual([1, 2, 4, 8, 8]);
    t.clock.advanceMinutes(8 / 60);
    expect((await signInAs(c, 'supervisor')).status).toBe(201);
    // The success forgot the failures: the next wrong password is free again.
    expect((await signInAs(c, 'supervisor', 'guess')).status).toBe(401);
    // Another account from the same address was never slowed.
    expect((await signInAs(c, 'engineer')).status).toBe(201);
  });

  it('forgets failures after a quiet window', async () => {
    await t.close();
    t = await startTestApp({ signInLimit: { perAddress: 1000, perAccount: 2, windowMs: 60_000 } });
    const c = t.client();
    for (let i = 0; i < 2; i++) await signInAs(c, 'operator', 'guess');
    expect((await signInAs(c, 'operator')).status).toBe(429);
    t.clock.advanceMinutes(1.5);
    expect((await signInAs(c, 'operator')).status).toBe(201);
  });

  it('counts parallel guesses at once, so a burst gets no more than the free failures through', async () => {
    await t.close();
    t = await startTestApp({ signInLimit: { perAddress: 1000, perAccount: 3, windowMs: 60_000 } });
    const answers = await Promise.all(Array.from({ length: 12 }, () => signInAs(t.client(), 'engineer', 'guess')));
    expect(answers.filter((r) => r.status === 401)).toHaveLength(3);
    expect(answers.filter((r) => r.status === 429)).toHaveLength(9);
  });

  it('stops one address after its failed sign-ins, whatever the accounts', async () => {
    await t.close();
    t = await startTestApp({ signInLimit: { perAddress: 2, perAccount: 100, windowMs: 60_000 } });
    const c = t.client();
    expect((await signInAs(c, 'admin')).status).toBe(201);
    await signInAs(c, 'engineer', 'x');
    await signInAs(c, 'operator', 'x');
    const refused = await signInAs(c, 'admin');
    expect(refused.status).toBe(429);
    expect(refused.body.error.message).toMatch(/this network/);
  });
});

describe('session lifetime', () => {
  it('sign-out ends the session at once, even for a copy of the cookie', async () => {
    const c = await t.signIn('supervisor');
    const stolen = c.cookie!;
    expect((await c.del('/api/session')).status).toBe(204);
    const again = t.client();
    again.cookie = stolen;
    expect((await again.get('/api/site')).status).toBe(401);
    expect((await again.get('/api/session')).body.user).toBeNull();
  });

  it('expires after the idle limit and after the absolute limit', async () => {
    const idle = await t.signIn('admin');
    t.clock.advanceMinutes(61);
    expect((await idle.get('/api/site')).status).toBe(401);

    const busy = await t.signIn('admin');
    for (let elapsed = 50; elapsed < 24 * 60; elapsed += 50) {
      t.clock.advanceMinutes(50);
      expect((await busy.get('/api/site')).status).toBe(200);
    }
    t.clock.advanceMinutes(50);
    expect((await busy.get('/api/site')).status).toBe(401);
  });

  it('refuses a tampered token and a token signed with another key', async () => {
    const c = await t.signIn('admin');
    const [name, token] = c.cookie!.split('=') as [string, string];
    const [h, p, s] = token.split('.');
    const payload = JSON.parse(Buffer.from(p!, 'base64url').toString());
    payload.sub = '2';
    const forged = `${h}.${Buffer.from(JSON.stringify(payload)).toString('base64url')}.${s}`;
    c.cookie = `${name}=${forged}`;
    expect((await c.get('/api/site')).status).toBe(401);
    c.cookie = `${name}=${token.slice(0, -2)}xx`;
    expect((await c.get('/api/site')).status).toBe(401);
  });

  it('a role change takes effect on the next request', async () => {
    const admin = await t.signIn('admin');
    const engineer = await t.signIn('engineer');
    expect((await engineer.get('/api/lots')).status).toBe(200);
    const users = (await admin.get('/api/users')).body.users as { id: number; role: string }[];
    const id = users.find((u) => u.role === 'engineer')!.id;
    expect((await admin.patch(`/api/users/${id}`, { role: 'operator' })).body.role).toBe('operator');
    expect((await engineer.get('/api/lots')).status).toBe(401);
  });

  it('an admin cannot demote or deactivate themselves', async () => {
    const admin = await t.signIn('admin');
    const me = (await admin.get('/api/session')).body.user;
    const r = await admin.patch(`/api/users/${me.id}`, { role: 'operator' });
    expect(r.status).toBe(409);
    expect((await admin.get('/api/session')).body.user.role).toBe('admin');
  });
});

describe('cautions acknowledgement', () => {
  it('is remembered for the user and audited', async () => {
    const c = await t.signIn('operator');
    expect((await c.get('/api/session')).body.user.cautionsAcknowledgedAt).toBeNull();
    const r = await c.patch('/api/session', { cautionsAcknowledged: true });
    expect(r.status).toBe(200);
    expect(r.body.user.cautionsAcknowledgedAt).toBe('2026-12-01T08:00:00.000Z');
    expect((await listAudit(t.db, 1)).some((e) => e.action === 'cautions.acknowledge')).toBe(true);
  });
});

describe('audit chain', () => {
  it('links sign-ins into a chain that verifies, and names the first edited event', async () => {
    await t.signIn('admin');
    await t.signIn('engineer');
    await t.client().post('/api/session', { email: email('engineer'), password: 'wrong' });
    expect(await verifyAudit(t.db, 1)).toMatchObject({ ok: true, events: 3 });
    const second = (await listAudit(t.db, 1))[1]!;
    await rawSql(t.db, 'update audit_events set actor = ? where id = ?', 'someone-else@haldenbay.test', second.id);
    expect(await verifyAudit(t.db, 1)).toMatchObject({ ok: false, events: 3, firstBrokenId: second.id });
  });
});
