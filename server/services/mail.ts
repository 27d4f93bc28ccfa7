import nodemailer from 'nodemailer';
import { writeTx, type Db } from '../../db/client';
import type { Outbox, OutboxMessage } from '../../src/contracts/mail';
import type { SessionUser } from '../../src/contracts/session';
import type { Clock } from '../clock';
import { HttpError, notFound } from '../http-error';
import { appendAudit } from './audit';
import { findSiteMail, insertMail, claimDueMail, listSiteMail, updateMail, type MailRow } from '../repositories/mail';

export type MailInput = { siteId: number | null; to: string; subject: string; text: string; html?: string; kind: string; at: Date };

/** Queues a message. Call inside the write's transaction: the record and its notice land together. */
export async function enqueueMail(tx: Db, m: MailInput): Promise<MailRow> {
  return await insertMail(tx, {
    siteId: m.siteId,
    to: m.to,
    subject: m.subject,
    text: m.text,
    html: m.html ?? null,
    kind: m.kind,
    nextAttemptAt: m.at.toISOString(),
    createdAt: m.at.toISOString(),
  });
}

/** What the sender hands a message to; nodemailer's transport in the app, anything in tests. */
export type MailTransport = { sendMail(m: { from: string; to: string; subject: string; text: string; html?: string }): Promise<unknown> };

export type SmtpConfig = { host: string; port: number; secure: boolean; user?: string; pass?: string };

export function smtpTransport(c: SmtpConfig): MailTransport {
  return nodemailer.createTransport({
    host: c.host,
    port: c.port,
    secure: c.secure,
    auth: c.user ? { user: c.user, pass: c.pass ?? '' } : undefined,
    // A local sink on loopback offers no certificate; a real relay is reached with TLS as it announces.
    ignoreTLS: c.host === '127.0.0.1',
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
}

// Backoff: 30 s, 1, 2, 4 ... min, at most an hour apart; after MAX_ATTEMPTS the message is marked failed
// (about 10 hours of trying), and an admin can queue it again from the outbox.
export const MAX_ATTEMPTS = 12;
const BASE_DELAY_MS = 30_000;
const MAX_DELAY_MS = 3_600_000;
export const retryDelayMs = (attempts: number) => Math.min(MAX_DELAY_MS, BASE_DELAY_MS * 2 ** Math.max(0, attempts - 1));

export type MailSender = {
  /** Sends every due message once; resolves with how many were sent and how many failed this round. */
  deliverDue(): Promise<{ sent: number; failed: number }>;
  /** Asks for a round soon (after a write queued mail) without waiting for it. */
  kick(): void;
  /** No more rounds; resolves when the one under way (if any) has finished. */
  stop(): Promise<void>;
};

// How long a claimed message is this sender's: longer than a send can take (the transport's own timeouts).
const SEND_LEASE_MS = 5 * 60_000;

/** Delivers the outbox: a round every `intervalMs`, one round at a time, and on `kick()`. */
export function createMailSender(opts: { db: Db; clock: Clock; transport: MailTransport; from: string; intervalMs?: number; batch?: number }): MailSender {
  const { db, clock, transport, from } = opts;
  let running: Promise<{ sent: number; failed: number }> | null = null;
  let timer: ReturnType<typeof setInterval> | null = null;
  let stopped = false;

  async function round() {
    let sent = 0;
    let failed = 0;
    const now = clock.now();
    for (const m of await claimDueMail(db, now.toISOString(), new Date(now.getTime() + SEND_LEASE_MS).toISOString(), opts.batch ?? 50)) {
      try {
        await transport.sendMail({ from, to: m.to, subject: m.subject, text: m.text, html: m.html ?? undefined });
        await updateMail(db, m.id, { status: 'sent', attempts: m.attempts + 1, sentAt: clock.now().toISOString(), lastError: null });
        sent++;
      } catch (e) {
        const attempts = m.attempts + 1;
        const lastError = (e instanceof Error ? e.message : String(e)).slice(0, 500);
        const giveUp = attempts >= MAX_ATTEMPTS;
        await updateMail(db, m.id, {
          status: giveUp ? 'failed' : 'pending',
          attempts,
          lastError,
          nextAttemptAt: new Date(clock.now().getTime() + retryDelayMs(attempts)).toISOString(),
        });
        failed++;
      }
    }
    return { sent, failed };
  }

  const deliverDue = () => {
    if (stopped) return Promise.resolve({ sent: 0, failed: 0 });
    // One round at a time: a kick during a round waits for it instead of sending the same row twice.
    running ??= round().finally(() => {
      running = null;
    });
    return running;
  };
  if (opts.intervalMs) {
    const t = setInterval(() => void deliverDue().catch((e) => console.error('mail round failed', e)), opts.intervalMs);
    // Node's timer: a pending round must not keep a finished process alive.
    (t as unknown as { unref?: () => void }).unref?.();
    timer = t;
  }
  return {
    deliverDue,
    kick: () => void setImmediate(() => void deliverDue().catch((e) => console.error('mail round failed', e))),
    stop: async () => {
      stopped = true;
      if (timer) clearInterval(timer);
      await running?.catch(() => undefined);
    },
  };
}

const toMessage = (m: MailRow): OutboxMessage => ({
  id: m.id,
  to: m.to,
  subject: m.subject,
  kind: m.kind,
  status: m.status,
  attempts: m.attempts,
  lastError: m.lastError,
  nextAttemptAt: m.status === 'pending' ? m.nextAttemptAt : null,
  createdAt: m.createdAt,
  sentAt: m.sentAt,
});

export const siteOutbox = async (db: Db, actor: SessionUser): Promise<Outbox> => ({ messages: (await listSiteMail(db, actor.siteId, 200)).map(toMessage) });

/** Puts a message that gave up back in the queue, due now. */
export async function retryMail(db: Db, clock: Clock, actor: SessionUser, id: number): Promise<OutboxMessage> {
  const m = await findSiteMail(db, actor.siteId, id);
  if (!m) throw notFound('Message');
  if (m.status === 'sent') throw new HttpError(409, 'already_sent', 'This message was already delivered');
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const after = await updateMail(tx, id, { status: 'pending', attempts: 0, nextAttemptAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: actor.siteId,
      userId: actor.id,
      actor: actor.email,
      action: 'mail.retry',
      entity: 'mail',
      entityId: id,
      oldValue: { status: m.status, attempts: m.attempts },
      newValue: { status: 'pending' },
      at: now,
    });
    return toMessage(after);
  });
}
