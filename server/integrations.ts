import crypto from 'node:crypto';
import type { Db } from '../db/client';
import type { BillingEnv, MailEnv } from './env';
import { startSmtpSink, type SmtpSink } from './fakes/smtp-sink';
import { startStripeFake, type StripeFake } from './fakes/stripe-fake';
import { listLinkedSubscriptions } from './repositories/billing';
import { findSite } from './repositories/sites';
import { createBilling, stripeClient, type Billing } from './services/billing-provider';
import { smtpTransport, type MailTransport } from './services/mail';

export type Integrations = {
  billing: Billing;
  mailTransport: MailTransport;
  mailFrom: string;
  stripeFake: StripeFake | null;
  smtpSink: SmtpSink | null;
  /** Tells the fake where the app listens (real Stripe is configured in its dashboard instead). */
  appListening(appUrl: string): void;
  close(): Promise<void>;
};

/**
 * Payment provider and mail relay from the configuration, or the local fakes (loopback only) when none is
 * configured. With the fake, subscriptions the database already holds (the demo seed) are handed to it.
 */
export async function startIntegrations(db: Db, cfg: { billing: BillingEnv; mail: MailEnv; fakeWebhookSecret: () => string }): Promise<Integrations> {
  let stripeFake: StripeFake | null = null;
  let billing: Billing;
  if (cfg.billing.mode === 'stripe') {
    billing = createBilling(stripeClient(cfg.billing.secretKey), cfg.billing.webhookSecret, STRIPE_PAY_ORIGINS);
  } else {
    ({ fake: stripeFake, billing } = await startFakeBilling({ port: cfg.billing.fakePort, webhookSecret: cfg.fakeWebhookSecret() }));
    await handOverToFake(db, stripeFake, billing);
  }
  let smtpSink: SmtpSink | null = null;
  let mailTransport: MailTransport;
  if (cfg.mail.mode === 'smtp') {
    mailTransport = smtpTransport(cfg.mail);
  } else {
    smtpSink = await startSmtpSink({ port: cfg.mail.sinkPort, dir: cfg.mail.sinkDir });
    mailTransport = smtpTransport({ host: '127.0.0.1', port: smtpSink.port, secure: false });
  }
  return {
    billing,
    mailTransport,
    mailFrom: cfg.mail.from,
    stripeFake,
    smtpSink,
    appListening: (appUrl) => stripeFake?.setWebhookUrl(`${appUrl}/api/billing/webhook`),
    close: async () => {
      await stripeFake?.close();
      await smtpSink?.close();
    },
  };
}

// Where Stripe's own payment pages live (hosted invoices, Checkout); from Stripe's documentation as remembered.
const STRIPE_PAY_ORIGINS = ['https://checkout.stripe.com', 'https://invoice.stripe.com', 'https://pay.stripe.com'];

/**
 * The local fake and the SDK client pointed at it. The webhook secret is the installation's (never a constant
 * in the source) and the API key is random per start, so no one can sign events or drive the fake by reading the code.
 */
export async function startFakeBilling(opts: { port?: number; webhookSecret: string }): Promise<{ fake: StripeFake; billing: Billing }> {
  const apiKey = `sk_test_local_${crypto.randomBytes(18).toString('base64url')}`;
  const fake = await startStripeFake({ port: opts.port ?? 0, webhookSecret: opts.webhookSecret, apiKey });
  const billing = createBilling(stripeClient(apiKey, { host: '127.0.0.1', port: fake.port, protocol: 'http' }), opts.webhookSecret, [new URL(fake.url).origin]);
  return { fake, billing };
}

/** Gives the fake the customers and subscriptions the database refers to, so they can be changed there. */
export async function handOverToFake(db: Db, fake: StripeFake, billing: Billing): Promise<void> {
  const rows = await listLinkedSubscriptions(db);
  if (!rows.length) return;
  const price = await billing.seatPrice();
  for (const r of rows) {
    if (r.status === 'none') continue;
    fake.adopt({
      customerId: r.stripeCustomerId!,
      customerName: (await findSite(db, r.siteId))?.name ?? `Site ${r.siteId}`,
      subscriptionId: r.stripeSubscriptionId!,
      itemId: r.stripeItemId ?? `si_${r.siteId}`,
      priceId: price.priceId,
      quantity: Math.max(1, r.seats),
      status: r.status,
      metadata: { siteId: String(r.siteId) },
    });
  }
}
