import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { cliArgs } from '../../server/cli-args';
import { readEnv } from '../../server/env';
import { listAudit } from '../../server/repositories/audit';
import { startBillingTestApp, type BillingTestApp } from './billing-harness';
import { email, password } from './harness';

let t: BillingTestApp;
beforeEach(async () => {
  t = await startBillingTestApp();
});
afterEach(() => t.closeAll());

const signInWith = (addr: string, pw: string) => t.client().post('/api/session', { email: addr, password: pw });
const actions = async (site = 1) => (await listAudit(t.db, site)).map((e) => e.action);

describe('changing your own password', () => {
  it('needs the current password, ends your other sessions and keeps this one', async () => {
    const here = await t.signIn('engineer');
    const elsewhere = await t.signIn('engineer');
    const wrong = await here.post('/api/session/password', { currentPassword: 'not-it', newPassword: 'a-brand-new-password' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields.currentPassword).toMatch(/current password/);
    const short = await here.post('/api/session/password', { currentPassword: password('engineer'), newPassword: 'short' });
    expect(short.body.error.fields.newPassword).toMatch(/12 characters/);
    expect((await here.post('/api/session/password', { currentPassword: password('engineer'), newPassword: 'a-brand-new-password' })).status).toBe(204);
    expect((await here.get('/api/session')).body.user.email).toBe(email('engineer'));
    expect((await elsewhere.get('/api/session')).body.user).toBeNull();
    expect((await signInWith(email('engineer'), password('engineer'))).status).toBe(401);
    expect((await signInWith(email('engineer'), 'a-brand-new-password')).status).toBe(201);
    expect(await actions()).toContain('user.password.change');
  });
});

describe('a reset link mailed by an admin', () => {
  const tokenIn = (text: string) => /\/reset-password\?token=([\w.-]+)/.exec(text)![1]!;

  it('goes out through the outbox and SMTP, works once, ends the person’s sessions, and is audited', async () => {
    const admin = await t.signIn('admin');
    const op = await t.signIn('operator');
    const users = (await admin.get('/api/users')).body.users as { id: number; email: string }[];
    const target = users.find((u) => u.email === email('operator'))!;
    const sent = await admin.post(`/api/users/${target.id}/password-reset`, {});
    expect(sent.status).toBe(201);
    expect(sent.body).toEqual({ to: email('operator'), expiresAt: '2026-12-02T08:00:00.000Z' });
    const mail = await t.sink.waitFor((m) => m.to.includes(email('operator')) && /password/.test(m.subject));
    const token = tokenIn(mail.text);
    expect(mail.text).toContain('http://yieldpoint.test/reset-password?token=');
    const anon = t.client();
    expect((await anon.post('/api/password-resets/preview', { token })).body).toEqual({ email: email('operator'), expiresAt: '2026-12-02T08:00:00.000Z' });
    expect((await anon.post('/api/password-resets', { token, password: 'operator-new-password' })).status).toBe(201);
    expect((await op.get('/api/session')).body.user).toBeNull();
    expect((await signInWith(email('operator'), 'operator-new-password')).status).toBe(201);
    const again = await anon.post('/api/password-resets', { token, password: 'operator-third-password' });
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe('reset_used');
    expect(await actions()).toEqual(expect.arrayContaining(['user.password-reset.send', 'user.password-reset.use']));
  });

  it('expires, refuses a forged token, and only an admin of the person’s own site can send one', async () => {
    const admin = await t.signIn('admin');
    const target = ((await admin.get('/api/users')).body.users as { id: number; email: string }[]).find((u) => u.email === email('supervisor'))!;
    expect((await (await t.signIn('supervisor')).post(`/api/users/${target.id}/password-reset`, {})).status).toBe(403);
    expect((await (await t.signIn('admin', 'other')).post(`/api/users/${target.id}/password-reset`, {})).status).toBe(404);
    await admin.post(`/api/users/${target.id}/password-reset`, {});
    const token = tokenIn((await t.sink.waitFor((m) => m.to.includes(email('supervisor')))).text);
    const forged = `${token.slice(0, -4)}AAAA`;
    expect((await t.client().post('/api/password-resets', { token: forged, password: 'whatever-password' })).status).toBe(404);
    t.clock.advanceMinutes(24 * 60 + 1);
    const late = await t.client().post('/api/password-resets', { token, password: 'whatever-password' });
    expect(late.status).toBe(410);
    expect(late.body.error.message).toMatch(/expired/);
  });
});

describe('inviting', () => {
  it('an address used at another site is invited like any other: nothing about the other site is told', async () => {
    const admin = await t.signIn('admin');
    const res = await admin.post('/api/invites', { email: email('engineer', 'other'), role: 'operator' });
    expect(res.status).toBe(201);
    expect(JSON.stringify(res.body)).not.toMatch(/already|other plant/i);
    // Only the address's owner, at the link, learns that the address already signs in.
    const token = /accept-invite\?token=([\w-]+)/.exec((await t.sink.waitFor((m) => m.to.includes(email('engineer', 'other')))).text)![1]!;
    const accept = await t.client().post('/api/invites/accept', { token, name: 'Someone', password: 'a-long-new-password' });
    expect(accept.status).toBe(409);
    expect(accept.body.error.message).not.toMatch(/Other Plant/);
  });

  it('a person of this site who lost access (deactivated) can be invited again and comes back with a new password', async () => {
    const admin = await t.signIn('admin');
    const target = ((await admin.get('/api/users')).body.users as { id: number; email: string }[]).find((u) => u.email === email('procurement'))!;
    expect((await admin.patch(`/api/users/${target.id}`, { isActive: false })).status).toBe(200);
    const res = await admin.post('/api/invites', { email: email('procurement'), role: 'procurement' });
    expect(res.status).toBe(201);
    const token = /accept-invite\?token=([\w-]+)/.exec(
      (await t.sink.waitFor((m) => m.to.includes(email('procurement')) && /invited/.test(m.subject))).text,
    )![1]!;
    expect((await t.client().post('/api/invites/accept', { token, name: 'Back Again', password: 'back-again-password' })).status).toBe(201);
    const signIn = await signInWith(email('procurement'), 'back-again-password');
    expect(signIn.status).toBe(201);
    expect(signIn.body.user).toMatchObject({ id: target.id, name: 'Back Again', role: 'procurement' });
    // An active person of this site is pointed to the reset instead.
    const active = await admin.post('/api/invites', { email: email('engineer'), role: 'engineer' });
    expect(active.status).toBe(409);
    expect(active.body.error.message).toMatch(/password reset/);
  });
});

const env = (vars: Record<string, string>) => vars as NodeJS.ProcessEnv;

describe('set-up', () => {
  it('create-admin keeps a password holding "=" whole', () => {
    expect(cliArgs(['--password=abcdefghijkl=mnop', '--site=Plant = North', '--name='])).toEqual({
      password: 'abcdefghijkl=mnop',
      site: 'Plant = North',
      name: '',
    });
  });

  it('the session cookie is Secure by default when PUBLIC_URL is https, and COOKIE_SECURE still decides when set', () => {
    expect(readEnv(env({ PUBLIC_URL: 'https://plant.example' })).cookieSecure).toBe(true);
    expect(readEnv(env({ PUBLIC_URL: 'http://10.0.0.5:8080' })).cookieSecure).toBe(false);
    expect(readEnv(env({})).cookieSecure).toBe(false);
    expect(readEnv(env({ PUBLIC_URL: 'https://plant.example', COOKIE_SECURE: '0' })).cookieSecure).toBe(false);
  });
});
