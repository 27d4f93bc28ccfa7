import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { closeDb, writeTx, type Db } from '../../db/client';
import { mailOutbox } from '../../db/tables';
import { startSmtpSink } from '../../server/fakes/smtp-sink';
import { createMailSender, enqueueMail, MAX_ATTEMPTS, retryDelayMs, smtpTransport } from '../../server/services/mail';
import { listAudit } from '../../server/repositories/audit';
import { startBillingTestApp, type BillingTestApp } from './billing-harness';
import { openTestDb, TestClock } from './harness';

describe('invites', () => {
  let t: BillingTestApp;
  beforeEach(async () => {
    t = await startBillingTestApp();
  });
  afterEach(() => t.closeAll());

  const linkIn = (text: string) => /http:\/\/yieldpoint\.test\/accept-invite\?token=([\w-]+)/.exec(text)![1]!;

  it('mails a link through the outbox; the invited person sets a password and signs in', async () => {
    const admin = await t.signIn('admin');
    const r = await admin.post('/api/invites', { email: 'New.Person@HaldenBay.test', role: 'engineer' });
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ email: 'new.person@haldenbay.test', role: 'engineer' });
    const mail = await t.sink.waitFor((m) => m.to.includes('new.person@haldenbay.test'));
    expect(mail.subject).toBe('Ines Varga invited you to Yieldpoint at Halden Bay Biorefinery');
    const token = linkIn(mail.text);
    const outbox = (await admin.get('/api/mail-outbox')).body.messages;
    expect(outbox[0]).toMatchObject({ to: 'new.person@haldenbay.test', kind: 'invite', status: 'sent', attempts: 1 });
    // The outbox never shows the link: it is the invited person's key.
    expect(JSON.stringify(outbox)).not.toContain(token);

    const anon = t.client();
    expect((await anon.post('/api/invites/preview', { token })).body).toEqual({
      email: 'new.person@haldenbay.test',
      role: 'engineer',
      siteName: 'Halden Bay Biorefinery',
      expiresAt: '2026-12-08T08:00:00.000Z',
    });
    const short = await anon.post('/api/invites/accept', { token, name: 'Nadia Person', password: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.fields.password).toMatch(/12 characters/);
    const ok = await anon.post('/api/invites/accept', { token, name: 'Nadia Person', password: 'a-long-new-password' });
    expect(ok.status).toBe(201);
    const signIn = await t.client().post('/api/session', { email: 'new.person@haldenbay.test', password: 'a-long-new-password' });
    expect(signIn.status).toBe(201);
    expect(signIn.body.user).toMatchObject({ role: 'engineer', name: 'Nadia Person', siteId: 1 });
    // The link works once.
    const twice = await anon.post('/api/invites/accept', { token, name: 'Someone', password: 'another-long-password' });
    expect(twice.status).toBe(410);
    expect(twice.body.error.code).toBe('invite_used');
    expect((await listAudit(t.db, 1)).map((e) => e.action)).toEqual(expect.arrayContaining(['invite.create', 'invite.accept']));
  });

  it('refuses an invite beyond the paid seats with a clear message, and queues no mail for it', async () => {
    const admin = await t.signIn('admin');
    for (const n of [1, 2, 3]) expect((await admin.post('/api/invites', { email: `p${n}@haldenbay.test`, role: 'operator' })).status).toBe(201);
    const over = await admin.post('/api/invites', { email: 'p4@haldenbay.test', role: 'operator' });
    expect(over.status).toBe(409);
    expect(over.body.error.code).toBe('no_free_seat');
    expect(over.body.error.message).toBe(
      'All 8 paid seats are taken (5 active people and 3 open invites). Buy more seats on the Billing screen, or deactivate someone or withdraw an invite first.',
    );
    expect((await admin.get('/api/invites')).body.invites).toHaveLength(3);
    expect((await t.db.select().from(mailOutbox).orderBy(mailOutbox.id)).map((m) => m.to).sort()).toEqual([
      'p1@haldenbay.test',
      'p2@haldenbay.test',
      'p3@haldenbay.test',
    ]);
    // Withdrawing one frees its seat.
    const first = (await admin.get('/api/invites')).body.invites.find((i: { email: string }) => i.email === 'p1@haldenbay.test');
    expect((await admin.del(`/api/invites/${first.id}`)).status).toBe(204);
    expect((await admin.post('/api/invites', { email: 'p4@haldenbay.test', role: 'operator' })).status).toBe(201);
  });

  it('refuses reactivating a user when every seat is taken', async () => {
    const admin = await t.signIn('admin');
    const users = (await admin.get('/api/users')).body.users as { id: number; role: string }[];
    const op = users.find((u) => u.role === 'operator')!;
    expect((await admin.patch(`/api/users/${op.id}`, { isActive: false })).status).toBe(200);
    for (const n of [1, 2, 3, 4]) expect((await admin.post('/api/invites', { email: `q${n}@haldenbay.test`, role: 'operator' })).status).toBe(201);
    const r = await admin.patch(`/api/users/${op.id}`, { isActive: true });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe('no_free_seat');
    expect((await admin.get('/api/users')).body.users.find((u: { id: number }) => u.id === op.id).isActive).toBe(false);
  });

  it('refuses an e-mail already in use, a second open invite, an unknown or expired link, and other sites', async () => {
    const admin = await t.signIn('admin');
    expect((await admin.post('/api/invites', { email: 'engineer@haldenbay.test', role: 'operator' })).body.error.code).toBe('email_taken');
    expect((await admin.post('/api/invites', { email: 'z@haldenbay.test', role: 'operator' })).status).toBe(201);
    expect((await admin.post('/api/invites', { email: 'z@haldenbay.test', role: 'operator' })).body.error.code).toBe('already_invited');
    const unknown = await t.client().post('/api/invites/preview', { token: 'x'.repeat(43) });
    expect(unknown.status).toBe(404);
    const token = linkIn((await t.sink.waitFor((m) => m.to.includes('z@haldenbay.test'))).text);
    const invite = (await admin.get('/api/invites')).body.invites[0];
    const otherAdmin = await t.signIn('admin', 'other');
    expect((await otherAdmin.del(`/api/invites/${invite.id}`)).status).toBe(404);
    t.clock.advanceMinutes(7 * 24 * 60);
    const expired = await t.client().post('/api/invites/accept', { token, name: 'Z', password: 'a-long-new-password' });
    expect(expired.status).toBe(410);
    expect(expired.body.error.code).toBe('invite_expired');
  });
});

describe('mail outbox', () => {
  let db: Db;
  beforeEach(async () => {
    db = await openTestDb();
  });
  afterEach(() => closeDb(db));

  const queue = async (clock: TestClock, to: string) =>
    await writeTx(db, (tx) => enqueueMail(tx, { siteId: null, to, subject: `Hello ${to}`, text: 'Body', kind: 'test', at: clock.now() }));

  it('keeps messages while the relay is down and delivers them all when it is back', async () => {
    const clock = new TestClock();
    // A port that was just free: nothing listens there until the sink starts on it.
    const probe = await startSmtpSink();
    const port = probe.port;
    await probe.close();
    const sender = createMailSender({ db, clock, transport: smtpTransport({ host: '127.0.0.1', port, secure: false }), from: 'test@yieldpoint.test' });
    await queue(clock, 'a@x.test');
    await queue(clock, 'b@x.test');

    expect(await sender.deliverDue()).toEqual({ sent: 0, failed: 2 });
    let rows = await db.select().from(mailOutbox).orderBy(mailOutbox.id);
    expect(rows.map((r) => [r.status, r.attempts])).toEqual([
      ['pending', 1],
      ['pending', 1],
    ]);
    expect(rows[0]!.lastError).toMatch(/ECONNREFUSED/);
    // Not due again before the backoff has passed.
    expect(await sender.deliverDue()).toEqual({ sent: 0, failed: 0 });

    const sink = await startSmtpSink({ port });
    try {
      clock.advanceMinutes(retryDelayMs(1) / 60_000);
      expect(await sender.deliverDue()).toEqual({ sent: 2, failed: 0 });
      rows = await db.select().from(mailOutbox).orderBy(mailOutbox.id);
      expect(rows.map((r) => [r.status, r.attempts, r.lastError])).toEqual([
        ['sent', 2, null],
        ['sent', 2, null],
      ]);
      expect(
        sink
          .messages()
          .map((m) => m.to[0])
          .sort(),
      ).toEqual(['a@x.test', 'b@x.test']);
      expect(sink.messages()[0]!.subject).toBe('Hello a@x.test');
    } finally {
      await sink.close();
      await sender.stop();
    }
  });

  it('backs off 30 s, doubling, at most an hour; gives up after the last attempt and shows it failed', async () => {
    expect([1, 2, 3, 4, 8, 20].map(retryDelayMs)).toEqual([30_000, 60_000, 120_000, 240_000, 3_600_000, 3_600_000]);
    const clock = new TestClock();
    const sender = createMailSender({ db, clock, transport: { sendMail: () => Promise.reject(new Error('relay said no')) }, from: 'x@y.test' });
    await queue(clock, 'c@x.test');
    for (let i = 0; i < MAX_ATTEMPTS; i++) {
      await sender.deliverDue();
      clock.advanceMinutes(60);
    }
    const [row] = await db.select().from(mailOutbox).orderBy(mailOutbox.id);
    expect(row).toMatchObject({ status: 'failed', attempts: MAX_ATTEMPTS, lastError: 'relay said no' });
    expect(await sender.deliverDue()).toEqual({ sent: 0, failed: 0 });
  });
});
