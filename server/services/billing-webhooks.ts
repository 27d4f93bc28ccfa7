import type Stripe from 'stripe';
import { writeTx, type Db } from '../../db/client';
import type { SubscriptionStatus } from '../../src/contracts/billing';
import { HttpError } from '../http-error';
import { claimEvent, findSubscriptionByCustomer, isEventClaimed, upsertInvoice, upsertSubscription, type SubscriptionRow } from '../repositories/billing';
import { appendAudit } from './audit';
import { GRACE_DAYS, type BillingContext } from './billing';
import { PLAN_NAME, providerPayUrl, type Billing } from './billing-provider';

const ACTOR = 'payment-provider';
const iso = (unixSeconds: number) => new Date(unixSeconds * 1000).toISOString();
const hostOf = (url: string) => {
  try {
    return new URL(url).host.slice(0, 200);
  } catch {
    return 'not an address';
  }
};
const idOf = (v: string | { id: string } | null | undefined) => (v == null ? null : typeof v === 'string' ? v : v.id);

function mapStatus(s: Stripe.Subscription.Status): SubscriptionStatus {
  if (s === 'active' || s === 'trialing') return 'active';
  if (s === 'past_due' || s === 'unpaid' || s === 'incomplete') return 'past_due';
  return 'canceled';
}

/**
 * Applies one signed event from the payment provider. The signature is checked with the SDK; each event id
 * is applied once (a redelivery answers `duplicate`); the seat count and status change only here.
 */
export async function handleStripeEvent(ctx: BillingContext, raw: Buffer, signature: string | undefined): Promise<{ duplicate: boolean }> {
  const billing = ctx.billing;
  if (!billing) throw new HttpError(503, 'billing_unavailable', 'Payments are not set up on this server');
  let event: Stripe.Event;
  try {
    event = billing.stripe.webhooks.constructEvent(raw, signature ?? '', billing.webhookSecret);
  } catch {
    throw new HttpError(400, 'bad_signature', 'The event signature does not verify');
  }
  if (await isEventClaimed(ctx.db, event.id)) return { duplicate: true };

  // The one effect that calls out: raise the plan's quantity after the seats were paid for. The provider's
  // idempotency key makes a second delivery of the same event (racing this one) change nothing there.
  if (event.type === 'checkout.session.completed') {
    const s = event.data.object;
    if (s.mode === 'payment' && s.payment_status === 'paid' && s.metadata?.kind === 'add_seats' && s.metadata.subscription) {
      const add = Number(s.metadata.addSeats);
      const sub = await billing.stripe.subscriptions.retrieve(s.metadata.subscription);
      const item = sub.items.data[0];
      if (item && Number.isInteger(add) && add > 0) {
        await billing.stripe.subscriptions.update(
          sub.id,
          { items: [{ id: item.id, quantity: (item.quantity ?? 0) + add }], proration_behavior: 'none' },
          { idempotencyKey: `yieldpoint-add-seats-${event.id}` },
        );
      }
    }
  }

  const now = ctx.clock.now();
  const duplicate = await writeTx(ctx.db, async (tx) => {
    const site = await siteOf(tx, event);
    if (!(await claimEvent(tx, { eventId: event.id, type: event.type, siteId: site?.siteId ?? null, receivedAt: now.toISOString() }))) return true;
    if (!site) return false;
    switch (event.type) {
      case 'customer.subscription.created':
      case 'customer.subscription.updated':
      case 'customer.subscription.deleted':
        await applySubscription(tx, site, event.data.object, event.type === 'customer.subscription.deleted', event.created, now);
        break;
      case 'invoice.paid':
      case 'invoice.payment_failed':
      case 'invoice.finalized':
      case 'invoice.voided':
        await applyInvoice(tx, site, event.data.object, event.type === 'invoice.payment_failed', now, billing);
        break;
    }
    return false;
  });
  return { duplicate };
}

/** The site an event is about: known by the customer id we stored when we created that customer. */
async function siteOf(db: Db, event: Stripe.Event): Promise<SubscriptionRow | undefined> {
  const o = event.data.object as { customer?: string | { id: string } | null };
  const customer = idOf(o.customer);
  return customer ? await findSubscriptionByCustomer(db, customer) : undefined;
}

async function applySubscription(db: Db, row: SubscriptionRow, sub: Stripe.Subscription, deleted: boolean, created: number, now: Date): Promise<void> {
  // Events can arrive out of order; one older than the last applied would undo a newer state.
  if (created < row.lastEventCreated) return;
  // A plan other than the one we track (e.g. an older one replaced) must not overwrite it.
  if (row.stripeSubscriptionId && row.stripeSubscriptionId !== sub.id && row.status !== 'canceled' && row.status !== 'none') return;
  const item = sub.items.data[0];
  const status = deleted ? 'canceled' : mapStatus(sub.status);
  const graceEndsAt =
    status === 'past_due'
      ? row.status === 'past_due' && row.graceEndsAt
        ? row.graceEndsAt
        : new Date(now.getTime() + GRACE_DAYS * 86_400_000).toISOString()
      : null;
  const after = await upsertSubscription(db, {
    ...row,
    plan: PLAN_NAME,
    seats: deleted ? 0 : (item?.quantity ?? 0),
    status,
    graceEndsAt,
    currentPeriodEnd: item ? iso(item.current_period_end) : row.currentPeriodEnd,
    stripeSubscriptionId: sub.id,
    stripeItemId: item?.id ?? row.stripeItemId,
    lastEventCreated: created,
    updatedAt: now.toISOString(),
  });
  if (after.seats !== row.seats || after.status !== row.status) {
    await appendAudit(db, {
      siteId: row.siteId,
      userId: null,
      actor: ACTOR,
      action: 'billing.subscription.update',
      entity: 'subscription',
      entityId: row.siteId,
      oldValue: { seats: row.seats, status: row.status },
      newValue: { seats: after.seats, status: after.status, graceEndsAt },
      at: now,
    });
  }
}

async function applyInvoice(db: Db, row: SubscriptionRow, inv: Stripe.Invoice, failed: boolean, now: Date, billing: Billing): Promise<void> {
  if (!inv.id) return;
  // Only the provider's own payment page is kept; any other address is refused and the refusal audited.
  const hostedUrl = providerPayUrl(billing, inv.hosted_invoice_url);
  if (inv.hosted_invoice_url && !hostedUrl) {
    await appendAudit(db, {
      siteId: row.siteId,
      userId: null,
      actor: ACTOR,
      action: 'billing.pay-link.refused',
      entity: 'invoice',
      entityId: inv.id,
      newValue: { host: hostOf(inv.hosted_invoice_url) },
      at: now,
    });
  }
  await upsertInvoice(db, {
    siteId: row.siteId,
    stripeInvoiceId: inv.id,
    number: inv.number ?? inv.id,
    status: inv.status ?? 'open',
    currency: inv.currency,
    amountDueCents: inv.amount_due,
    amountPaidCents: inv.amount_paid,
    seats: inv.lines.data.reduce((a, l) => a + (l.quantity ?? 0), 0),
    periodStart: iso(inv.period_start),
    periodEnd: iso(inv.period_end),
    hostedUrl,
    issuedAt: iso(inv.created),
  });
  // A failed renewal starts the grace period at once, even if the subscription's own event comes later.
  if (failed && row.status === 'active') {
    const graceEndsAt = new Date(now.getTime() + GRACE_DAYS * 86_400_000).toISOString();
    await upsertSubscription(db, { ...row, status: 'past_due', graceEndsAt, updatedAt: now.toISOString() });
    await appendAudit(db, {
      siteId: row.siteId,
      userId: null,
      actor: ACTOR,
      action: 'billing.payment.failed',
      entity: 'invoice',
      entityId: inv.id,
      newValue: { number: inv.number, amountDueCents: inv.amount_due, graceEndsAt },
      at: now,
    });
  }
}
