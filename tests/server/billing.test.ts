import { rawSql, rowCount } from '../support/raw-sql';
import Stripe from 'stripe';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEMO_SEATS } from '../../db/seed';
import { TEST_CARDS } from '../../server/fakes/stripe-fake';
import { listAudit } from '../../server/repositories/audit';
import { findSubscription, listSiteInvoices } from '../../server/repositories/billing';
import { startBillingTestApp, type BillingTestApp } from './billing-harness';

let t: BillingTestApp;
beforeEach(async () => {
  t = await startBillingTestApp();
});
afterEach(() => t.closeAll());

const SITE = 1;
const seats = async () => (await findSubscription(t.db, SITE))!.seats;
/** The demo site's ids at the provider, as seeded (random per seed). */
const demoIds = async () => {
  const row = (await findSubscription(t.db, SITE))!;
  return { customer: row.stripeCustomerId!, subscription: row.stripeSubscriptionId! };
};
const fakeQuantity = async () => t.fake.get((await demoIds()).subscription)!.items.data[0].quantity as number;

/** Submits the fake's hosted card form as a browser would, without following the redirect. */
const pay = (url: string, card: string) => fetch(url, { method: 'POST', body: new URLSearchParams({ card, exp: '12/34', cvc: '123' }), redirect: 'manual' });

async function checkout(addSeats: number): Promise<string> {
  const admin = await t.signIn('admin');
  const r = await admin.post('/api/billing/checkout', { addSeats });
  expect(r.status).toBe(201);
  return r.body.url as string;
}

/** A webhook delivery signed with the SDK's helper, as the provider signs it. */
function signed(event: object, secret = t.billing.webhookSecret) {
  const payload = JSON.stringify(event);
  return { payload, header: t.billing.stripe.webhooks.generateTestHeaderString({ payload, secret }) };
}
const deliver = (payload: string, header?: string) =>
  fetch(`${t.base}/api/billing/webhook`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...(header ? { 'stripe-signature': header } : {}) },
    body: payload,
  });

async function subscriptionEvent(id: string, quantity: number, created = Math.floor(Date.now() / 1000)) {
  const sub = structuredClone(t.fake.get((await demoIds()).subscription)!);
  sub.items.data[0].quantity = quantity;
  return {
    id,
    object: 'event',
    api_version: '2026-02-25.clover',
    created,
    type: 'customer.subscription.updated',
    data: { object: sub },
    livemode: false,
    pending_webhooks: 1,
    request: { id: null, idempotency_key: null },
  };
}

describe('webhook signatures', () => {
  it('refuses a bad, missing or foreign signature and a tampered body, and changes nothing', async () => {
    const event = await subscriptionEvent('evt_test_forged', 40);
    const wrongSecret = signed(event, 'whsec_someone_else');
    const good = signed(event);
    const tampered = good.payload.replace('"quantity":40', '"quantity":400');
    for (const [payload, header] of [
      [wrongSecret.payload, wrongSecret.header],
      [good.payload, undefined],
      [good.payload, 't=1,v1=00'],
      [tampered, good.header],
    ] as const) {
      const r = await deliver(payload, header);
      expect(r.status).toBe(400);
      expect((await r.json()).error.code).toBe('bad_signature');
    }
    expect(await seats()).toBe(DEMO_SEATS);
    expect(await rowCount(t.db, 'billing_events')).toBe(0);
  });

  it('takes a correctly signed event without a session or the client header', async () => {
    const { payload, header } = signed(await subscriptionEvent('evt_test_ok', 9));
    const r = await deliver(payload, header);
    expect(r.status).toBe(200);
    expect(await seats()).toBe(9);
  });
});

describe('each event applies once', () => {
  it('a redelivered seat purchase adds the seats once', async () => {
    const url = await checkout(3);
    expect((await pay(url, TEST_CARDS.accepted)).status).toBe(303);
    expect(await seats()).toBe(DEMO_SEATS + 3);
    const completed = t.fake.events().find((e) => e.type === 'checkout.session.completed')!;
    const again = signed(completed);
    const r = await deliver(again.payload, again.header);
    expect(r.status).toBe(200);
    expect(await r.json()).toEqual({ received: true, duplicate: true });
    expect(await seats()).toBe(DEMO_SEATS + 3);
    expect(await fakeQuantity()).toBe(DEMO_SEATS + 3);
  });

  it('the same subscription event twice writes one audit event', async () => {
    const { payload, header } = signed(await subscriptionEvent('evt_test_twice', 12));
    expect((await deliver(payload, header)).status).toBe(200);
    expect((await (await deliver(payload, header)).json()).duplicate).toBe(true);
    expect(await seats()).toBe(12);
    expect((await listAudit(t.db, SITE)).filter((e) => e.action === 'billing.subscription.update')).toHaveLength(1);
  });

  it('an older event delivered late does not undo a newer one', async () => {
    const now = Math.floor(Date.now() / 1000);
    const newer = signed(await subscriptionEvent('evt_test_newer', 10, now));
    const older = signed(await subscriptionEvent('evt_test_older', 9, now - 60));
    await deliver(newer.payload, newer.header);
    await deliver(older.payload, older.header);
    expect(await seats()).toBe(10);
  });
});

describe('buying seats', () => {
  it('a declined card leaves the seats, the provider quantity and the invoices unchanged', async () => {
    const url = await checkout(3);
    const invoicesBefore = (await listSiteInvoices(t.db, SITE)).length;
    const r = await pay(url, TEST_CARDS.declined);
    expect(r.status).toBe(200);
    expect(await r.text()).toContain('<p class="err" role="alert" data-testid="pay-error">Your card was declined.</p>');
    expect(await seats()).toBe(DEMO_SEATS);
    expect(await fakeQuantity()).toBe(DEMO_SEATS);
    expect(await listSiteInvoices(t.db, SITE)).toHaveLength(invoicesBefore);
    // The same page then takes a good card.
    const ok = await pay(url, TEST_CARDS.accepted);
    expect(ok.status).toBe(303);
    // Back to PUBLIC_URL through the landing page, which names the seats for the notice.
    expect(ok.headers.get('location')).toBe(`http://yieldpoint.test/api/billing/return?checkout=done&added=3&from=${DEMO_SEATS}`);
    expect(await seats()).toBe(DEMO_SEATS + 3);
    const invoices = await listSiteInvoices(t.db, SITE);
    expect(invoices).toHaveLength(invoicesBefore + 1);
    expect(invoices[0]).toMatchObject({ status: 'paid', seats: 3, amountPaidCents: 3 * 4900, currency: 'eur' });
  });

  it('without PUBLIC_URL the payment page returns to the address the admin used, and the landing page moves on to billing', async () => {
    await t.closeAll();
    t = await startBillingTestApp({ publicUrl: null });
    const url = await checkout(2);
    const ok = await pay(url, TEST_CARDS.accepted);
    const back = ok.headers.get('location')!;
    expect(back).toBe(`${t.base}/api/billing/return?checkout=done&added=2&from=${DEMO_SEATS}`);
    // Open to a browser without its cookie; the page moves on by a navigation of its own, to billing only.
    const landing = await fetch(back);
    expect(landing.status).toBe(200);
    expect(landing.headers.get('content-type')).toMatch(/^text\/html/);
    expect(await landing.text()).toContain(`<meta http-equiv="refresh" content="0;url=/billing?checkout=done&added=2&from=${DEMO_SEATS}">`);
    const odd = await (await fetch(`${t.base}/api/billing/return?checkout=%22%3E%3Cscript%3E&added=x&from=1`)).text();
    expect(odd).toContain('content="0;url=/billing?checkout=canceled">');
    expect(odd).not.toContain('<script');
  });

  it('refuses a checkout request from a non-admin and a bad seat count, and needs no browser word for seats', async () => {
    const eng = await t.signIn('engineer');
    expect((await eng.post('/api/billing/checkout', { addSeats: 3 })).status).toBe(403);
    const admin = await t.signIn('admin');
    const bad = await admin.post('/api/billing/checkout', { addSeats: 0 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.addSeats).toBeTruthy();
    // Coming back to the success page proves nothing: the seat count waits for the provider's event.
    await checkout(2);
    expect(await seats()).toBe(DEMO_SEATS);
  });

  it('starts a new plan for a site that has none', async () => {
    await rawSql(t.db, 'delete from subscriptions where site_id = 2');
    const other = await t.signIn('admin', 'other');
    const r = await other.post('/api/billing/checkout', { addSeats: 6 });
    expect(r.status).toBe(201);
    expect((await pay(r.body.url, TEST_CARDS.accepted)).status).toBe(303);
    const row = (await findSubscription(t.db, 2))!;
    expect(row).toMatchObject({ seats: 6, status: 'active' });
    expect(row.stripeSubscriptionId).toMatch(/^sub_/);
    expect(await seats()).toBe(DEMO_SEATS);
  });
});

describe('reducing seats', () => {
  it('cannot go below the seats in use, and can go down to them', async () => {
    const admin = await t.signIn('admin');
    const below = await admin.patch('/api/billing/seats', { seats: 4 });
    expect(below.status).toBe(409);
    expect(below.body.error.code).toBe('seats_in_use');
    expect(below.body.error.message).toMatch(/5 seats are in use/);
    expect(await seats()).toBe(DEMO_SEATS);
    expect(await fakeQuantity()).toBe(DEMO_SEATS);
    const down = await admin.patch('/api/billing/seats', { seats: 5 });
    expect(down.status).toBe(200);
    expect(down.body).toMatchObject({ seats: 5, seatsInUse: 5 });
    expect(await fakeQuantity()).toBe(5);
  });

  it('counts open invites as seats in use', async () => {
    const admin = await t.signIn('admin');
    expect((await admin.post('/api/invites', { email: 'new.person@haldenbay.test', role: 'operator' })).status).toBe(201);
    const r = await admin.patch('/api/billing/seats', { seats: 5 });
    expect(r.status).toBe(409);
    expect(r.body.error.message).toMatch(/6 seats are in use \(5 active people and 1 open invite\)/);
  });

  it('sends more seats through payment instead', async () => {
    const admin = await t.signIn('admin');
    const r = await admin.patch('/api/billing/seats', { seats: 20 });
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe('use_checkout');
    expect(await seats()).toBe(DEMO_SEATS);
  });
});

describe('failed payment', () => {
  it('gives a grace period, then makes the site read-only until the invoice is paid', async () => {
    const { subscription } = await demoIds();
    const renew = await fetch(`${t.fake.url}/_fake/subscriptions/${subscription}/renew`, {
      method: 'POST',
      headers: { authorization: `Bearer ${t.fake.apiKey}` },
      body: new URLSearchParams({ card: TEST_CARDS.declined }),
    });
    expect(renew.status).toBe(200);
    const admin = await t.signIn('admin');
    const summary = (await admin.get('/api/billing')).body;
    expect(summary).toMatchObject({ status: 'past_due', isReadOnly: false, seats: DEMO_SEATS });
    // Grace: 7 days from the failure (the test clock's now).
    expect(summary.graceEndsAt).toBe(new Date(t.clock.now().getTime() + 7 * 86_400_000).toISOString());
    const users = (await admin.get('/api/users')).body.users as { id: number; role: string }[];
    const op = users.find((u) => u.role === 'operator')!;
    expect((await admin.patch(`/api/users/${op.id}`, { name: 'Sunniva A.' })).status).toBe(200);

    t.clock.advanceMinutes(7 * 24 * 60 + 1);
    // The week also ended the session; signing in stays possible on a read-only site.
    const again = await t.signIn('admin');
    const refused = await again.patch(`/api/users/${op.id}`, { name: 'Someone else' });
    expect(refused.status).toBe(402);
    expect(refused.body.error.code).toBe('site_read_only');
    expect((await again.get('/api/users')).body.users.find((u: { id: number }) => u.id === op.id).name).toBe('Sunniva A.');
    expect((await again.get('/api/lots')).status).toBe(200);
    const after = (await again.get('/api/billing')).body;
    expect(after.isReadOnly).toBe(true);
    // The other site is not affected.
    const otherAdmin = await t.signIn('admin', 'other');
    expect((await otherAdmin.post('/api/invites', { email: 'x@otherplant.test', role: 'operator' })).status).toBe(201);

    const open = (await again.get('/api/billing/invoices')).body.invoices.find((i: { status: string }) => i.status === 'open');
    expect(open.payUrl).toMatch(/\/pay\/in_/);
    expect((await pay(open.payUrl, TEST_CARDS.accepted)).status).toBe(200);
    expect((await again.get('/api/billing')).body).toMatchObject({ status: 'active', isReadOnly: false, graceEndsAt: null });
    expect((await again.patch(`/api/users/${op.id}`, { name: 'Someone else' })).status).toBe(200);
  });
});

describe('the fake answers in the SDK types', () => {
  it('customers, prices with pagination, subscriptions, invoices, errors and idempotency', async () => {
    const stripe = t.billing.stripe;
    const customer: Stripe.Customer = await stripe.customers.create({ name: 'SDK check', metadata: { siteId: '99' } });
    expect(customer).toMatchObject({ object: 'customer', name: 'SDK check', metadata: { siteId: '99' } });
    expect(customer.id).toMatch(/^cus_/);

    const product: Stripe.Product = await stripe.products.create({ name: 'Pagination check' });
    for (const amount of [100, 200, 300]) await stripe.prices.create({ product: product.id, unit_amount: amount, currency: 'eur' });
    const page1: Stripe.ApiList<Stripe.Price> = await stripe.prices.list({ limit: 2 });
    expect(page1.object).toBe('list');
    expect(page1.data).toHaveLength(2);
    expect(page1.has_more).toBe(true);
    const page2 = await stripe.prices.list({ limit: 2, starting_after: page1.data[1]!.id });
    const seen = [...page1.data, ...page2.data].map((p) => p.id);
    expect(new Set(seen).size).toBe(seen.length);
    // Four prices: the seat price and the three above; auto-pagination walks them all.
    const all: Stripe.Price[] = [];
    for await (const p of stripe.prices.list({ limit: 1 })) all.push(p);
    expect(all).toHaveLength(4);

    const sub: Stripe.Subscription = await stripe.subscriptions.retrieve((await demoIds()).subscription);
    expect(sub.status).toBe('active');
    expect(sub.items.data[0]!.quantity).toBe(DEMO_SEATS);
    expect(typeof sub.items.data[0]!.current_period_end).toBe('number');

    const invoices: Stripe.ApiList<Stripe.Invoice> = await stripe.invoices.list({ customer: (await demoIds()).customer });
    expect(invoices.data).toEqual([]);

    const missing = await stripe.customers.retrieve('cus_nope').catch((e: unknown) => e);
    expect(missing).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    expect(missing).toMatchObject({ statusCode: 404, code: 'resource_missing', type: 'StripeInvalidRequestError' });

    const a = await stripe.customers.create({ name: 'Once' }, { idempotencyKey: 'check-key-1' });
    const b = await stripe.customers.create({ name: 'Once' }, { idempotencyKey: 'check-key-1' });
    expect(b.id).toBe(a.id);
    const clash = await stripe.customers.create({ name: 'Other' }, { idempotencyKey: 'check-key-1' }).catch((e: unknown) => e);
    expect(clash).toBeInstanceOf(Stripe.errors.StripeIdempotencyError);

    const wrongKey = new Stripe('sk_test_wrong', { host: '127.0.0.1', port: t.fake.port, protocol: 'http', maxNetworkRetries: 0 });
    await expect(wrongKey.customers.create({ name: 'x' })).rejects.toBeInstanceOf(Stripe.errors.StripeAuthenticationError);
  });
});
