import Stripe from 'stripe';
import { writeTx, type Db } from '../../db/client';
import type { BillingSummary, BuySeats, ChangeSeats, CheckoutStarted, Invoice } from '../../src/contracts/billing';
import type { SessionUser } from '../../src/contracts/session';
import type { AppContext } from '../context';
import { HttpError, notFound } from '../http-error';
import {
  countActiveUsers,
  countOpenInvites,
  findSubscription,
  listSiteInvoices,
  upsertSubscription,
  type InvoiceRow,
  type SubscriptionRow,
} from '../repositories/billing';
import { findSite } from '../repositories/sites';
import { appendAudit } from './audit';
import { PLAN_NAME, providerPayUrl, SEAT_PRICE, type Billing } from './billing-provider';

/** `publicUrl`: PUBLIC_URL when set; else the payment page returns to the address the request came to. */
export type BillingContext = Pick<AppContext, 'db' | 'clock' | 'billing' | 'publicUrl'>;

/** Days a site keeps working after a failed payment before it turns read-only (Yieldpoint's own rule). */
export const GRACE_DAYS = 7;

type Usage = { seats: number; activeUsers: number; pendingInvites: number; seatsInUse: number };

export async function seatUsage(db: Db, siteId: number, now: Date): Promise<Usage> {
  const seats = (await findSubscription(db, siteId))?.seats ?? 0;
  const activeUsers = await countActiveUsers(db, siteId);
  const pendingInvites = await countOpenInvites(db, siteId, now.toISOString());
  return { seats, activeUsers, pendingInvites, seatsInUse: activeUsers + pendingInvites };
}

const people = (u: Usage) =>
  `${u.activeUsers} active ${u.activeUsers === 1 ? 'person' : 'people'}${u.pendingInvites ? ` and ${u.pendingInvites} open ${u.pendingInvites === 1 ? 'invite' : 'invites'}` : ''}`;

/** Refuses a new invite or a reactivation when every paid seat is taken. */
export async function assertFreeSeat(db: Db, siteId: number, now: Date): Promise<void> {
  const u = await seatUsage(db, siteId, now);
  if (u.seatsInUse + 1 > u.seats) {
    throw new HttpError(
      409,
      'no_free_seat',
      u.seats === 0
        ? 'This site has no paid seats yet. Buy seats on the Billing screen first.'
        : `All ${u.seats} paid seats are taken (${people(u)}). Buy more seats on the Billing screen, or deactivate someone or withdraw an invite first.`,
    );
  }
}

export function isReadOnly(row: SubscriptionRow | undefined, now: Date): boolean {
  if (!row) return false;
  if (row.status === 'canceled') return true;
  return row.status === 'past_due' && row.graceEndsAt !== null && new Date(row.graceEndsAt) <= now;
}

/** Refuses writes on a site whose payment failed and whose grace period is over; reads stay allowed. */
export async function assertWritable(db: Db, siteId: number, now: Date): Promise<void> {
  const row = await findSubscription(db, siteId);
  if (!isReadOnly(row, now)) return;
  throw new HttpError(
    402,
    'site_read_only',
    row!.status === 'canceled'
      ? 'The subscription of this site has ended, so the site is read-only. An admin can buy seats on the Billing screen.'
      : `Payment for this site failed and the grace period ended on ${row!.graceEndsAt!.slice(0, 10)}, so the site is read-only. An admin can pay the open invoice on the Billing screen.`,
  );
}

export async function billingSummary({ db, clock }: BillingContext, actor: SessionUser): Promise<BillingSummary> {
  const now = clock.now();
  const row = await findSubscription(db, actor.siteId);
  const u = await seatUsage(db, actor.siteId, now);
  return {
    plan: row && row.status !== 'none' ? row.plan : 'No paid plan',
    status: row?.status ?? 'none',
    ...u,
    unitAmountCents: SEAT_PRICE.unitAmountCents,
    currency: SEAT_PRICE.currency,
    currentPeriodEnd: row?.currentPeriodEnd ?? null,
    graceEndsAt: row?.status === 'past_due' ? row.graceEndsAt : null,
    isReadOnly: isReadOnly(row, now),
    canChangeSeats: !!row?.stripeSubscriptionId && (row.status === 'active' || row.status === 'past_due'),
  };
}

const toInvoice =
  (billing: Billing | null) =>
  (r: InvoiceRow): Invoice => ({
    id: r.id,
    number: r.number,
    status: r.status,
    currency: r.currency,
    amountDueCents: r.amountDueCents,
    amountPaidCents: r.amountPaidCents,
    seats: r.seats,
    periodStart: r.periodStart,
    periodEnd: r.periodEnd,
    issuedAt: r.issuedAt,
    // Checked again on the way out: a row stored before the check, or a provider since changed, shows no foreign link.
    payUrl: r.status === 'open' ? providerPayUrl(billing, r.hostedUrl) : null,
  });

export const siteInvoices = async ({ db, billing }: BillingContext, actor: SessionUser) => ({
  invoices: (await listSiteInvoices(db, actor.siteId)).map(toInvoice(billing)),
});

function requireBilling(b: Billing | null): Billing {
  if (!b) throw new HttpError(503, 'billing_unavailable', 'Payments are not set up on this server');
  return b;
}

/** Turns a payment-provider failure into our error body, keeping its message (it names the problem). */
async function provider<T>(call: () => Promise<T>): Promise<T> {
  try {
    return await call();
  } catch (e) {
    if (e instanceof Stripe.errors.StripeError) throw new HttpError(502, 'payment_provider', `The payment provider refused: ${e.message}`);
    throw e;
  }
}

/** The site's payment customer, created (once, idempotently) on its first purchase. */
async function ensureCustomer(ctx: BillingContext, billing: Billing, actor: SessionUser): Promise<SubscriptionRow> {
  const existing = await findSubscription(ctx.db, actor.siteId);
  if (existing?.stripeCustomerId) return existing;
  const site = await findSite(ctx.db, actor.siteId);
  if (!site) throw notFound('Site');
  const customer = await provider(
    async () =>
      await billing.stripe.customers.create(
        { name: site.name, metadata: { siteId: String(site.id) } },
        { idempotencyKey: `yieldpoint-customer-site-${site.id}` },
      ),
  );
  const now = ctx.clock.now();
  return writeTx(ctx.db, async (tx) => {
    const row = await upsertSubscription(tx, {
      siteId: site.id,
      plan: existing?.plan ?? PLAN_NAME,
      seats: existing?.seats ?? 0,
      status: existing?.status ?? 'none',
      stripeCustomerId: customer.id,
      updatedAt: now.toISOString(),
    });
    await appendAudit(tx, {
      siteId: site.id,
      userId: actor.id,
      actor: actor.email,
      action: 'billing.customer.create',
      entity: 'subscription',
      entityId: site.id,
      newValue: { customer: customer.id },
      at: now,
    });
    return row;
  });
}

/**
 * Opens a payment page for more seats. The seat count changes later, when the provider's signed event says
 * the payment went through; nothing the browser sends back is taken as proof of payment.
 */
export async function startCheckout(ctx: BillingContext, actor: SessionUser, req: BuySeats, requestOrigin: string): Promise<CheckoutStarted> {
  const billing = requireBilling(ctx.billing);
  const row = await ensureCustomer(ctx, billing, actor);
  const price = await provider(() => billing.seatPrice());
  const site = String(actor.siteId);
  // Back through the landing page (see billingReturnPage): the session cookie is SameSite=Strict, so it is not
  // sent on the provider's cross-site redirect, only on the landing page's own same-site navigation.
  // The seat figures in it only word the notice; the seat count itself changes from the provider's signed event.
  const base = (ctx.publicUrl ?? requestOrigin).replace(/\/$/, '');
  const back = (outcome: string) => `${base}/api/billing/return?checkout=${outcome}&added=${req.addSeats}&from=${row.seats}`;
  const hasPlan = !!row.stripeSubscriptionId && (row.status === 'active' || row.status === 'past_due');
  const session = await provider(() =>
    hasPlan
      ? // Seats added to a running plan: one payment now for the added seats, then the plan's quantity is raised
        // when the completed-payment event arrives; later renewals bill the new quantity.
        billing.stripe.checkout.sessions.create({
          mode: 'payment',
          customer: row.stripeCustomerId!,
          line_items: [{ price_data: { currency: price.currency, product: price.productId, unit_amount: price.unitAmountCents }, quantity: req.addSeats }],
          invoice_creation: { enabled: true },
          metadata: { siteId: site, kind: 'add_seats', addSeats: String(req.addSeats), subscription: row.stripeSubscriptionId! },
          success_url: back('done'),
          cancel_url: back('canceled'),
        })
      : billing.stripe.checkout.sessions.create({
          mode: 'subscription',
          customer: row.stripeCustomerId!,
          line_items: [{ price: price.priceId, quantity: req.addSeats }],
          subscription_data: { metadata: { siteId: site } },
          metadata: { siteId: site, kind: 'new_plan' },
          success_url: back('done'),
          cancel_url: back('canceled'),
        }),
  );
  if (!providerPayUrl(billing, session.url)) throw new HttpError(502, 'payment_provider', 'The payment provider gave no payment page of its own');
  await appendAudit(ctx.db, {
    siteId: actor.siteId,
    userId: actor.id,
    actor: actor.email,
    action: 'billing.checkout.start',
    entity: 'subscription',
    entityId: actor.siteId,
    newValue: { addSeats: req.addSeats, checkoutSession: session.id },
    at: ctx.clock.now(),
  });
  return { url: session.url! };
}

/** Lowers the seat count on the provider; our count follows from its event. Raising goes through payment. */
export async function changeSeats(ctx: BillingContext, actor: SessionUser, req: ChangeSeats): Promise<BillingSummary> {
  const billing = requireBilling(ctx.billing);
  const now = ctx.clock.now();
  const row = await findSubscription(ctx.db, actor.siteId);
  if (!row?.stripeSubscriptionId || !row.stripeItemId || (row.status !== 'active' && row.status !== 'past_due')) {
    throw new HttpError(409, 'no_plan', 'This site has no running plan: buy seats first');
  }
  const u = await seatUsage(ctx.db, actor.siteId, now);
  if (req.seats < u.seatsInUse) {
    throw new HttpError(
      409,
      'seats_in_use',
      `${u.seatsInUse} seats are in use (${people(u)}): deactivate people or withdraw invites before going below that.`,
      { seats: `At least ${u.seatsInUse}` },
    );
  }
  if (req.seats > row.seats)
    throw new HttpError(409, 'use_checkout', 'More seats are bought through payment: use Buy seats', { seats: `At most ${row.seats} here` });
  if (req.seats === row.seats) return billingSummary(ctx, actor);
  await provider(
    async () =>
      await billing.stripe.subscriptions.update(row.stripeSubscriptionId!, {
        items: [{ id: row.stripeItemId!, quantity: req.seats }],
        proration_behavior: 'none',
      }),
  );
  await appendAudit(ctx.db, {
    siteId: actor.siteId,
    userId: actor.id,
    actor: actor.email,
    action: 'billing.seats.request',
    entity: 'subscription',
    entityId: actor.siteId,
    oldValue: { seats: row.seats },
    newValue: { seats: req.seats },
    at: now,
  });
  return billingSummary(ctx, actor);
}

/**
 * The page the payment provider sends the browser back to. Its only job is to move on to the billing screen
 * with a navigation of its own (a meta refresh, which the content security policy allows where a script is not):
 * that navigation starts on this site, so the browser sends the SameSite=Strict session cookie with it.
 */
export function billingReturnPage(query: Record<string, unknown>): string {
  const checkout = query.checkout === 'done' ? 'done' : 'canceled';
  const int = (v: unknown) => (typeof v === 'string' && /^\d{1,4}$/.test(v) ? v : null);
  const added = int(query.added),
    from = int(query.from);
  const target = `/billing?checkout=${checkout}${added && from ? `&added=${added}&from=${from}` : ''}`;
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><meta http-equiv="refresh" content="0;url=${target}"><title>Back to billing · Yieldpoint</title></head><body><p><a href="${target}">Back to billing</a></p></body></html>`;
}
