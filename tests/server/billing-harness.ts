import { startSmtpSink, type SmtpSink } from '../../server/fakes/smtp-sink';
import { FAKE_API_KEY, startStripeFake, type StripeFake } from '../../server/fakes/stripe-fake';
import { FAKE_WEBHOOK_SECRET, handOverToFake } from '../../server/integrations';
import { createBilling, stripeClient, type Billing } from '../../server/services/billing-provider';
import { createMailSender, smtpTransport, type MailSender } from '../../server/services/mail';
import { startTestApp, type TestApp } from './harness';

export type BillingTestApp = TestApp & { fake: StripeFake; billing: Billing; sink: SmtpSink; mail: MailSender; closeAll(): Promise<void> };

/** The test app wired to the local fake Stripe (webhooks back to the app) and a mail sink, as `npm start` does. */
export async function startBillingTestApp(opts: { publicUrl?: string | null } = {}): Promise<BillingTestApp> {
  const fake = await startStripeFake({ webhookSecret: FAKE_WEBHOOK_SECRET });
  const billing = createBilling(stripeClient(FAKE_API_KEY, { host: '127.0.0.1', port: fake.port, protocol: 'http' }), FAKE_WEBHOOK_SECRET);
  const sink = await startSmtpSink();
  let mail: MailSender | null = null;
  const t = await startTestApp({ billing, publicUrl: opts.publicUrl === null ? undefined : (opts.publicUrl ?? 'http://yieldpoint.test'), mail: { kick: () => mail?.kick() } });
  mail = createMailSender({ db: t.db, clock: t.clock, transport: smtpTransport({ host: '127.0.0.1', port: sink.port, secure: false }), from: 'Yieldpoint <no-reply@yieldpoint.test>' });
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
