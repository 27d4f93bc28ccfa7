import { startSmtpSink, type SmtpSink } from '../../server/fakes/smtp-sink';
import type { StripeFake } from '../../server/fakes/stripe-fake';
import crypto from 'node:crypto';
import { handOverToFake, startFakeBilling } from '../../server/integrations';
import type { Billing } from '../../server/services/billing-provider';
import { createMailSender, smtpTransport, type MailSender } from '../../server/services/mail';
import { startTestApp, type TestApp } from './harness';

export type BillingTestApp = TestApp & { fake: StripeFake; billing: Billing; sink: SmtpSink; mail: MailSender; closeAll(): Promise<void> };

/** The test app wired to the local fake Stripe (webhooks back to the app) and a mail sink, as `npm start` does. */
export async function startBillingTestApp(opts: { publicUrl?: string | null } = {}): Promise<BillingTestApp> {
  // A fresh secret per run, as each installation has its own.
  const webhookSecret = `whsec_${crypto.randomBytes(24).toString('hex')}`;
  const { fake, billing } = await startFakeBilling({ webhookSecret });
  const sink = await startSmtpSink();
  let mail: MailSender | null = null;
  const t = await startTestApp({
    billing,
    publicUrl: opts.publicUrl === null ? undefined : (opts.publicUrl ?? 'http://yieldpoint.test'),
    mail: { kick: () => mail?.kick() },
  });
  mail = createMailSender({
    db: t.db,
    clock: t.clock,
    transport: smtpTransport({ host: '127.0.0.1', port: sink.port, secure: false }),
    from: 'Yieldpoint <no-reply@yieldpoint.test>',
  });
  fake.setWebhookUrl(`${t.base}/api/billing/webhook`);
  await handOverToFake(t.db, fake, billing);
  const m = mail;
  return Object.assign(t, {
    fake,
    billing,
    sink,
    mail: m,
    async closeAll() {
      await m.stop();
      await t.close();
      await fake.close();
      await sink.close();
    },
  });
}
