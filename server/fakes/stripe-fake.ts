import crypto from 'node:crypto';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import express, { type Request, type Response } from 'express';
import Stripe from 'stripe';

/*
 * A local stand-in for the part of Stripe's REST API Yieldpoint uses, so development and tests run without
 * an account or a network: customers, products, prices, checkout sessions with a hosted test-card page,
 * subscriptions and their quantity, invoices, list pagination, idempotency keys, Stripe's error shape,
 * form-encoded bodies, and signed webhook events (signed with the SDK's own test-header helper).
 * Loopback only, in memory, and bounded (objects, bodies, idempotency keys, events kept).
 * Not Stripe: amounts are never prorated, and renewals happen only when a test asks for one.
 */

type Obj = Record<string, any> & { id: string; object: string; created: number };
type Card = { outcome: 'paid' } | { outcome: 'declined'; code: string; message: string };

export type StripeFakeOptions = {
  port?: number;
  apiKey?: string;
  webhookSecret: string;
  webhookUrl?: string;
  /** Upper bound of stored objects; beyond it every create answers 429. */
  maxObjects?: number;
};

export type StripeFake = {
  port: number;
  url: string;
  apiKey: string;
  setWebhookUrl(url: string): void;
  /** Takes over a subscription a database already knows (the demo seed), with its customer. */
  adopt(s: {
    customerId: string;
    customerName: string;
    subscriptionId: string;
    itemId: string;
    priceId: string;
    quantity: number;
    status: 'active' | 'past_due' | 'canceled';
    metadata: Record<string, string>;
  }): void;
  /** Every event sent so far, oldest first (the last 500). */
  events(): Obj[];
  get(id: string): Obj | undefined;
  close(): Promise<void>;
};

export const FAKE_API_KEY = 'sk_test_yieldpoint_local_fake';
export const TEST_CARDS = { accepted: '4242424242424242', declined: '4000000000000002', insufficientFunds: '4000000000009995' } as const;
const API_VERSION = '2026-02-25.clover';
const PERIOD_S = 30 * 86_400;
const MAX_EVENTS = 500;
const MAX_IDEMPOTENCY_KEYS = 1000;

class FakeError extends Error {
  constructor(
    readonly status: number,
    readonly type: string,
    readonly code: string | undefined,
    message: string,
    readonly param?: string,
  ) {
    super(message);
  }
}
const missing = (what: string, id: string) => new FakeError(404, 'invalid_request_error', 'resource_missing', `No such ${what}: '${id}'`, 'id');
const badParam = (param: string, message: string) => new FakeError(400, 'invalid_request_error', 'parameter_invalid', message, param);

function cardOutcome(raw: string): Card | null {
  const digits = raw.replace(/\D/g, '');
  if (digits === TEST_CARDS.accepted) return { outcome: 'paid' };
  if (digits === TEST_CARDS.declined) return { outcome: 'declined', code: 'card_declined', message: 'Your card was declined.' };
  if (digits === TEST_CARDS.insufficientFunds) return { outcome: 'declined', code: 'insufficient_funds', message: 'Your card has insufficient funds.' };
  return null;
}

const esc = (s: string) => s.replace(/[&<>"']/g, (ch) => `&#${ch.charCodeAt(0)};`);
const money = (cents: number, currency: string) => `${(cents / 100).toFixed(2)} ${currency.toUpperCase()}`;
const toInt = (v: unknown, param: string): number => {
  const n = Number(v);
  if (!Number.isInteger(n)) throw new FakeError(400, 'invalid_request_error', 'parameter_invalid_integer', `Invalid integer: ${String(v)}`, param);
  return n;
};
const asArray = (v: unknown): any[] => (Array.isArray(v) ? v : v && typeof v === 'object' ? Object.values(v) : []);

export async function startStripeFake(opts: StripeFakeOptions): Promise<StripeFake> {
  const apiKey = opts.apiKey ?? FAKE_API_KEY;
  const maxObjects = opts.maxObjects ?? 5000;
  const signer = new Stripe(apiKey);
  let webhookUrl = opts.webhookUrl ?? null;
  const store = new Map<string, Obj>();
  const sent: Obj[] = [];
  const idempotency = new Map<string, { fingerprint: string; status: number; body: unknown }>();
  let invoiceSeq = 0;
  let baseUrl = '';

  const now = () => Math.floor(Date.now() / 1000);
  const newId = (prefix: string) => `${prefix}_${crypto.randomBytes(12).toString('hex')}`;
  function put<T extends Obj>(o: T): T {
    if (!store.has(o.id) && store.size >= maxObjects)
      throw new FakeError(429, 'invalid_request_error', 'rate_limit', 'The local fake holds as many objects as it may');
    store.set(o.id, o);
    return o;
  }
  function find(id: string, object: string, what: string): Obj {
    const o = store.get(id);
    if (!o || o.object !== object) throw missing(what, id);
    return o;
  }
  const list = (url: string, all: Obj[], q: Request['query']) => {
    const limit = Math.min(100, Math.max(1, q.limit === undefined ? 10 : toInt(q.limit, 'limit')));
    // Stripe lists newest first; ties keep creation order reversed.
    const sorted = all
      .map((o, i) => ({ o, i }))
      .sort((a, b) => b.o.created - a.o.created || b.i - a.i)
      .map((x) => x.o);
    let start = 0;
    if (typeof q.starting_after === 'string') {
      const at = sorted.findIndex((o) => o.id === q.starting_after);
      if (at < 0) throw missing('object', q.starting_after);
      start = at + 1;
    }
    const data = sorted.slice(start, start + limit);
    return { object: 'list', data, has_more: start + limit < sorted.length, url };
  };
  const ofType = (object: string) => [...store.values()].filter((o) => o.object === object);

  async function emit(type: string, object: Obj, previous?: Record<string, unknown>): Promise<void> {
    const event: Obj = {
      id: newId('evt'),
      object: 'event',
      api_version: API_VERSION,
      created: now(),
      data: previous ? { object: structuredClone(object), previous_attributes: previous } : { object: structuredClone(object) },
      livemode: false,
      pending_webhooks: 1,
      request: { id: null, idempotency_key: null },
      type,
    };
    sent.push(event);
    if (sent.length > MAX_EVENTS) sent.shift();
    if (!webhookUrl) return;
    const payload = JSON.stringify(event);
    // Delivered before the API call that caused it answers, so a caller sees the app already updated; a
    // failing endpoint gets three more tries with growing pauses, as Stripe retries (on a much longer scale).
    for (const pause of [0, 200, 1000, 3000]) {
      if (pause) await new Promise((r) => setTimeout(r, pause));
      try {
        const header = signer.webhooks.generateTestHeaderString({ payload, secret: opts.webhookSecret });
        const res = await fetch(webhookUrl, {
          method: 'POST',
          headers: { 'content-type': 'application/json', 'stripe-signature': header },
          body: payload,
          signal: AbortSignal.timeout(15_000),
        });
        await res.arrayBuffer();
        if (res.ok) return;
      } catch {
        /* retried */
      }
    }
    console.error(`stripe fake: webhook ${type} ${event.id} was not accepted by ${webhookUrl}`);
  }

  // --- objects ---------------------------------------------------------------------------------------
  const subscriptionItem = (subId: string, price: Obj, quantity: number, start: number) => ({
    id: newId('si'),
    object: 'subscription_item',
    created: start,
    current_period_start: start,
    current_period_end: start + PERIOD_S,
    discounts: [],
    metadata: {},
    price,
    quantity,
    subscription: subId,
    tax_rates: [],
  });

  function makeSubscription(customer: string, price: Obj, quantity: number, metadata: Record<string, string>, ids?: { id: string; itemId: string }): Obj {
    const id = ids?.id ?? newId('sub');
    const t = now();
    const item = { ...subscriptionItem(id, price, quantity, t), ...(ids ? { id: ids.itemId } : {}) };
    return put({
      id,
      object: 'subscription',
      created: t,
      customer,
      currency: price.currency,
      status: 'active',
      start_date: t,
      billing_cycle_anchor: t,
      cancel_at: null,
      cancel_at_period_end: false,
      canceled_at: null,
      ended_at: null,
      collection_method: 'charge_automatically',
      items: { object: 'list', data: [item], has_more: false, url: `/v1/subscription_items?subscription=${id}` },
      latest_invoice: null,
      livemode: false,
      metadata,
    });
  }

  function makeInvoice(
    customer: string,
    lines: { description: string; quantity: number; unitAmount: number; price: Obj | null }[],
    currency: string,
    paid: boolean,
    sub: Obj | null,
    metadata: Record<string, string> = {},
  ): Obj {
    const id = newId('in');
    const t = now();
    const total = lines.reduce((a, l) => a + l.quantity * l.unitAmount, 0);
    const item = sub?.items.data[0];
    return put({
      id,
      object: 'invoice',
      created: t,
      customer,
      currency,
      number: `YPF-${String(++invoiceSeq).padStart(5, '0')}`,
      status: paid ? 'paid' : 'open',
      amount_due: total,
      amount_paid: paid ? total : 0,
      amount_remaining: paid ? 0 : total,
      attempt_count: 1,
      attempted: true,
      billing_reason: sub ? 'subscription_cycle' : 'manual',
      collection_method: 'charge_automatically',
      hosted_invoice_url: `${baseUrl}/pay/${id}`,
      livemode: false,
      metadata,
      period_start: item?.current_period_start ?? t,
      period_end: item?.current_period_end ?? t,
      parent: sub ? { type: 'subscription_details', quote_details: null, subscription_details: { metadata: sub.metadata, subscription: sub.id } } : null,
      status_transitions: { finalized_at: t, paid_at: paid ? t : null, marked_uncollectible_at: null, voided_at: null },
      total,
      subtotal: total,
      lines: {
        object: 'list',
        has_more: false,
        url: `/v1/invoices/${id}/lines`,
        data: lines.map((l) => ({
          id: newId('il'),
          object: 'line_item',
          amount: l.quantity * l.unitAmount,
          currency,
          description: l.description,
          quantity: l.quantity,
          metadata: {},
          period: { start: item?.current_period_start ?? t, end: item?.current_period_end ?? t },
        })),
      },
    });
  }

  const lineItemsOf = (session: Obj) =>
    session._lines as { price: Obj | null; priceData: { currency: string; unitAmount: number; productName: string } | null; quantity: number }[];

  // --- hosted page ----------------------------------------------------------------------------------
  // A refused card re-renders the form with the reason (status 200, as a hosted page does), not an HTTP error.
  function payPage(res: Response, title: string, summary: string, error: string | null) {
    res.status(200).type('html')
      .send(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>${esc(title)} · local test payment</title>
<style>body{font-family:system-ui,sans-serif;margin:0;background:#eef1f4;color:#1b2330}main{max-width:420px;margin:0 auto;padding:24px}
section{background:#fff;border:1px solid #cfd6de;border-radius:12px;padding:20px;display:grid;gap:12px}label{display:grid;gap:4px;font-weight:600}
input{font:inherit;min-height:44px;padding:0 12px;border:1px solid #8a96a3;border-radius:8px}button{font:inherit;font-weight:600;min-height:44px;border:0;border-radius:8px;background:#24405e;color:#fff}
.err{color:#a3262a;font-weight:600}.note{font-size:14px;color:#4a5562}</style></head><body><main>
<p class="note">Local test payment page: no real card is charged. Accepted: 4242 4242 4242 4242. Declined: 4000 0000 0000 0002.</p>
<section><h1 style="margin:0;font-size:22px">${esc(title)}</h1><p style="margin:0">${esc(summary)}</p>
${error ? `<p class="err" role="alert" data-testid="pay-error">${esc(error)}</p>` : ''}
<form method="post"><div style="display:grid;gap:12px">
<label>Card number<input name="card" inputmode="numeric" autocomplete="cc-number" data-testid="pay-card" required></label>
<label>Expiry (MM/YY)<input name="exp" value="12/34" data-testid="pay-exp"></label>
<label>CVC<input name="cvc" value="123" data-testid="pay-cvc"></label>
<button type="submit" data-testid="pay-submit">Pay</button></div></form></section></main></body></html>`);
  }
  function donePage(res: Response, message: string) {
    res
      .type('html')
      .send(
        `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Paid · local test payment</title></head><body style="font-family:system-ui,sans-serif;padding:24px"><p data-testid="pay-done">${esc(message)}</p></body></html>`,
      );
  }
  const sessionSummary = (s: Obj) =>
    `${lineItemsOf(s)
      .map((l) => `${l.quantity} × ${l.price?.nickname ?? l.priceData?.productName ?? 'item'}`)
      .join(', ')} — ${money(s.amount_total, s.currency)}`;

  async function completeSession(s: Obj): Promise<void> {
    const lines = lineItemsOf(s);
    const invoiceLines = lines.map((l) => ({
      description: l.price?.nickname ?? l.priceData!.productName,
      quantity: l.quantity,
      unitAmount: l.price?.unit_amount ?? l.priceData!.unitAmount,
      price: l.price,
    }));
    if (s.mode === 'subscription') {
      const first = lines[0]!;
      const sub = makeSubscription(s.customer, first.price!, first.quantity, s._subscriptionMetadata ?? {});
      const inv = makeInvoice(s.customer, invoiceLines, s.currency, true, sub);
      sub.latest_invoice = inv.id;
      Object.assign(s, { status: 'complete', payment_status: 'paid', subscription: sub.id, invoice: inv.id });
      await emit('customer.subscription.created', sub);
      await emit('invoice.paid', inv);
    } else {
      let invoice: string | null = null;
      if (s._invoiceCreation) {
        const inv = makeInvoice(s.customer, invoiceLines, s.currency, true, null, s.metadata);
        invoice = inv.id;
        await emit('invoice.paid', inv);
      }
      Object.assign(s, { status: 'complete', payment_status: 'paid', invoice });
    }
    await emit('checkout.session.completed', s);
  }

  async function settleInvoice(inv: Obj): Promise<void> {
    Object.assign(inv, { status: 'paid', amount_paid: inv.amount_due, amount_remaining: 0, attempt_count: inv.attempt_count + 1 });
    inv.status_transitions.paid_at = now();
    await emit('invoice.paid', inv);
    const subId = inv.parent?.subscription_details?.subscription;
    const sub = subId ? store.get(subId) : undefined;
    if (sub && sub.status === 'past_due') {
      sub.status = 'active';
      await emit('customer.subscription.updated', sub, { status: 'past_due' });
    }
  }

  // --- the API ---------------------------------------------------------------------------------------
  const app = express();
  app.set('query parser', 'extended');
  app.disable('x-powered-by');
  app.use(express.urlencoded({ extended: true, limit: '100kb', parameterLimit: 500 }));

  const fail = (res: Response, e: unknown) => {
    if (e instanceof FakeError) {
      res.status(e.status).json({ error: { type: e.type, code: e.code, message: e.message, ...(e.param ? { param: e.param } : {}) } });
    } else {
      console.error('stripe fake:', e);
      res.status(500).json({ error: { type: 'api_error', message: 'The local fake failed' } });
    }
  };

  /** An API route: checks the key, replays an idempotent POST, and maps FakeError to Stripe's error body. */
  const route =
    (handler: (req: Request) => Promise<{ status?: number; body: unknown }> | { status?: number; body: unknown }) => async (req: Request, res: Response) => {
      try {
        const auth = req.get('authorization') ?? '';
        if (auth !== `Bearer ${apiKey}`) throw new FakeError(401, 'invalid_request_error', 'api_key_invalid', 'Invalid API Key provided');
        const key = req.method === 'POST' ? req.get('idempotency-key') : undefined;
        const fingerprint = `${req.method} ${req.path} ${JSON.stringify(req.body ?? {})}`;
        if (key) {
          const seen = idempotency.get(key);
          if (seen) {
            if (seen.fingerprint !== fingerprint) {
              throw new FakeError(
                400,
                'idempotency_error',
                undefined,
                `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${key}' if you meant to execute a different request.`,
              );
            }
            res.status(seen.status).set('idempotent-replayed', 'true').json(seen.body);
            return;
          }
        }
        const out = await handler(req);
        const status = out.status ?? 200;
        if (key) {
          idempotency.set(key, { fingerprint, status, body: out.body });
          if (idempotency.size > MAX_IDEMPOTENCY_KEYS) idempotency.delete(idempotency.keys().next().value!);
        }
        res.status(status).json(out.body);
      } catch (e) {
        fail(res, e);
      }
    };
  const strip = (o: Obj) => Object.fromEntries(Object.entries(o).filter(([k]) => !k.startsWith('_')));
  const meta = (v: unknown): Record<string, string> =>
    v && typeof v === 'object' ? Object.fromEntries(Object.entries(v).map(([k, x]) => [k, String(x)])) : {};

  app.post(
    '/v1/customers',
    route((req) => ({
      body: put({
        id: newId('cus'),
        object: 'customer',
        created: now(),
        name: req.body.name ?? null,
        email: req.body.email ?? null,
        metadata: meta(req.body.metadata),
        livemode: false,
        balance: 0,
        currency: null,
        delinquent: false,
        description: null,
        invoice_prefix: 'YPF',
      }),
    })),
  );
  app.get(
    '/v1/customers/:id',
    route((req) => ({ body: find(req.params.id as string, 'customer', 'customer') })),
  );

  app.post(
    '/v1/products',
    route((req) => {
      if (!req.body.name) throw new FakeError(400, 'invalid_request_error', 'parameter_missing', 'Missing required param: name.', 'name');
      return {
        body: put({
          id: newId('prod'),
          object: 'product',
          created: now(),
          name: req.body.name,
          active: true,
          metadata: meta(req.body.metadata),
          livemode: false,
          description: null,
          updated: now(),
        }),
      };
    }),
  );
  app.post(
    '/v1/prices',
    route((req) => {
      const b = req.body;
      find(b.product, 'product', 'product');
      if (b.lookup_key && ofType('price').some((p) => p.lookup_key === b.lookup_key)) {
        throw new FakeError(400, 'invalid_request_error', 'lookup_key_exists', `A price (\`${b.lookup_key}\`) already uses that lookup key.`, 'lookup_key');
      }
      const unit = toInt(b.unit_amount, 'unit_amount');
      if (unit < 0) throw badParam('unit_amount', 'unit_amount must be at least 0');
      return {
        body: put({
          id: newId('price'),
          object: 'price',
          created: now(),
          active: true,
          currency: String(b.currency ?? '').toLowerCase(),
          lookup_key: b.lookup_key ?? null,
          nickname: b.nickname ?? null,
          product: b.product,
          recurring: b.recurring
            ? { interval: b.recurring.interval ?? 'month', interval_count: 1, usage_type: 'licensed', meter: null, trial_period_days: null }
            : null,
          type: b.recurring ? 'recurring' : 'one_time',
          unit_amount: unit,
          unit_amount_decimal: String(unit),
          billing_scheme: 'per_unit',
          livemode: false,
          metadata: meta(b.metadata),
          tax_behavior: 'unspecified',
          tiers_mode: null,
          transform_quantity: null,
        }),
      };
    }),
  );
  app.get(
    '/v1/prices',
    route((req) => {
      const keys = asArray(req.query.lookup_keys).map(String);
      return {
        body: list(
          '/v1/prices',
          ofType('price').filter((p) => !keys.length || keys.includes(p.lookup_key)),
          req.query,
        ),
      };
    }),
  );
  app.get(
    '/v1/prices/:id',
    route((req) => ({ body: find(req.params.id as string, 'price', 'price') })),
  );

  app.post(
    '/v1/checkout/sessions',
    route((req) => {
      const b = req.body;
      if (b.mode !== 'subscription' && b.mode !== 'payment') throw badParam('mode', 'mode must be subscription or payment in the local fake');
      if (!b.success_url) throw new FakeError(400, 'invalid_request_error', 'parameter_missing', 'Missing required param: success_url.', 'success_url');
      if (!b.customer) throw new FakeError(400, 'invalid_request_error', 'parameter_missing', 'The local fake needs a customer.', 'customer');
      find(b.customer, 'customer', 'customer');
      const lines = asArray(b.line_items).map((l, i) => {
        const quantity = toInt(l.quantity ?? 1, `line_items[${i}][quantity]`);
        if (quantity < 1) throw badParam(`line_items[${i}][quantity]`, 'Quantity must be at least 1');
        if (l.price) return { price: find(l.price, 'price', 'price'), priceData: null, quantity };
        if (!l.price_data)
          throw new FakeError(400, 'invalid_request_error', 'parameter_missing', 'Each line item needs price or price_data.', `line_items[${i}]`);
        const product = find(l.price_data.product, 'product', 'product');
        return {
          price: null,
          priceData: {
            currency: String(l.price_data.currency).toLowerCase(),
            unitAmount: toInt(l.price_data.unit_amount, `line_items[${i}][price_data][unit_amount]`),
            productName: product.name as string,
          },
          quantity,
        };
      });
      if (!lines.length) throw new FakeError(400, 'invalid_request_error', 'parameter_missing', 'Missing required param: line_items.', 'line_items');
      if (b.mode === 'subscription' && (lines.length !== 1 || !lines[0]!.price?.recurring))
        throw badParam('line_items', 'The local fake takes one recurring price per subscription');
      if (b.mode === 'payment' && lines.some((l) => l.price?.recurring))
        throw badParam('line_items', 'You must provide at least one recurring price in `subscription` mode when using prices.');
      const currency = lines[0]!.price?.currency ?? lines[0]!.priceData!.currency;
      const t = now();
      const id = newId('cs_test');
      const session = put({
        id,
        object: 'checkout.session',
        created: t,
        expires_at: t + 86_400,
        mode: b.mode,
        status: 'open',
        payment_status: 'unpaid',
        customer: b.customer,
        client_reference_id: b.client_reference_id ?? null,
        currency,
        amount_subtotal: lines.reduce((a, l) => a + l.quantity * (l.price?.unit_amount ?? l.priceData!.unitAmount), 0),
        amount_total: lines.reduce((a, l) => a + l.quantity * (l.price?.unit_amount ?? l.priceData!.unitAmount), 0),
        metadata: meta(b.metadata),
        success_url: b.success_url,
        cancel_url: b.cancel_url ?? null,
        subscription: null,
        invoice: null,
        livemode: false,
        url: `${baseUrl}/pay/${id}`,
        _lines: lines,
        _subscriptionMetadata: meta(b.subscription_data?.metadata),
        _invoiceCreation: b.invoice_creation?.enabled === 'true',
      });
      return { body: strip(session) };
    }),
  );
  app.get(
    '/v1/checkout/sessions/:id',
    route((req) => ({ body: strip(find(req.params.id as string, 'checkout.session', 'checkout.session')) })),
  );

  app.get(
    '/v1/subscriptions/:id',
    route((req) => ({ body: find(req.params.id as string, 'subscription', 'subscription') })),
  );
  app.get(
    '/v1/subscriptions',
    route((req) => ({
      body: list(
        '/v1/subscriptions',
        ofType('subscription').filter((s) => !req.query.customer || s.customer === req.query.customer),
        req.query,
      ),
    })),
  );
  app.post(
    '/v1/subscriptions/:id',
    route(async (req) => {
      const sub = find(req.params.id as string, 'subscription', 'subscription');
      if (sub.status === 'canceled')
        throw new FakeError(400, 'invalid_request_error', 'resource_missing', 'A canceled subscription can only update its cancellation_details and metadata.');
      const previous: Record<string, unknown> = {};
      for (const [i, change] of asArray(req.body.items).entries()) {
        const item = sub.items.data.find((it: Obj) => it.id === change.id);
        if (!item) throw badParam(`items[${i}][id]`, `No such subscription item: '${change.id}'`);
        if (change.quantity !== undefined) {
          const q = toInt(change.quantity, `items[${i}][quantity]`);
          if (q < 1) throw badParam(`items[${i}][quantity]`, 'Quantity must be at least 1');
          previous.items = structuredClone(sub.items);
          item.quantity = q;
        }
      }
      if (req.body.metadata) {
        previous.metadata = sub.metadata;
        sub.metadata = { ...sub.metadata, ...meta(req.body.metadata) };
      }
      if (Object.keys(previous).length) await emit('customer.subscription.updated', sub, previous);
      return { body: sub };
    }),
  );
  app.delete(
    '/v1/subscriptions/:id',
    route(async (req) => {
      const sub = find(req.params.id as string, 'subscription', 'subscription');
      Object.assign(sub, { status: 'canceled', canceled_at: now(), ended_at: now() });
      await emit('customer.subscription.deleted', sub);
      return { body: sub };
    }),
  );

  app.get(
    '/v1/invoices',
    route((req) => {
      const q = req.query;
      return {
        body: list(
          '/v1/invoices',
          ofType('invoice').filter(
            (i) =>
              (!q.customer || i.customer === q.customer) &&
              (!q.subscription || i.parent?.subscription_details?.subscription === q.subscription) &&
              (!q.status || i.status === q.status),
          ),
          q,
        ),
      };
    }),
  );
  app.get(
    '/v1/invoices/:id',
    route((req) => ({ body: find(req.params.id as string, 'invoice', 'invoice') })),
  );

  // Not part of Stripe's API: what a renewal would do at the end of a period, on request, for tests and demos.
  app.post(
    '/_fake/subscriptions/:id/renew',
    route(async (req) => {
      const sub = find(req.params.id as string, 'subscription', 'subscription');
      const card = cardOutcome(String(req.body.card ?? TEST_CARDS.accepted));
      const item = sub.items.data[0];
      const start = item.current_period_end;
      Object.assign(item, { current_period_start: start, current_period_end: start + PERIOD_S });
      const paid = card?.outcome === 'paid';
      const inv = makeInvoice(
        sub.customer,
        [{ description: item.price.nickname ?? 'Seat', quantity: item.quantity, unitAmount: item.price.unit_amount, price: item.price }],
        sub.currency,
        paid,
        sub,
      );
      sub.latest_invoice = inv.id;
      const before = sub.status;
      sub.status = paid ? 'active' : 'past_due';
      await emit(paid ? 'invoice.paid' : 'invoice.payment_failed', inv);
      await emit('customer.subscription.updated', sub, { status: before });
      return { body: inv };
    }),
  );

  app.get('/favicon.ico', (_req, res) => void res.status(204).end());
  app.get('/pay/:id', (req, res) => {
    const o = store.get(req.params.id);
    if (o?.object === 'checkout.session' && o.status === 'open') return payPage(res, 'Yieldpoint seats', sessionSummary(o), null);
    if (o?.object === 'invoice' && o.status === 'open') return payPage(res, `Invoice ${o.number}`, money(o.amount_due, o.currency), null);
    if (o?.object === 'invoice' && o.status === 'paid') return donePage(res, `Invoice ${o.number} is paid.`);
    res.status(404).type('text').send('This payment page has expired or does not exist.');
  });
  app.post('/pay/:id', async (req, res) => {
    try {
      const o = store.get(req.params.id);
      const isSession = o?.object === 'checkout.session';
      if (!o || !(isSession || o.object === 'invoice') || o.status !== 'open')
        return void res.status(404).type('text').send('This payment page has expired or does not exist.');
      const title = isSession ? 'Yieldpoint seats' : `Invoice ${o.number}`;
      const summary = isSession ? sessionSummary(o) : money(o.amount_due, o.currency);
      const card = cardOutcome(String(req.body.card ?? ''));
      if (!card) return payPage(res, title, summary, 'Use a test card number: 4242 4242 4242 4242 is accepted, 4000 0000 0000 0002 is declined.');
      if (card.outcome === 'declined') return payPage(res, title, summary, card.message);
      if (isSession) {
        await completeSession(o);
        return res.redirect(303, String(o.success_url).replace('{CHECKOUT_SESSION_ID}', o.id));
      }
      await settleInvoice(o);
      donePage(res, `Invoice ${o.number} is paid. You can return to Yieldpoint.`);
    } catch (e) {
      fail(res, e);
    }
  });
  app.use((req, res) =>
    fail(
      res,
      new FakeError(
        404,
        'invalid_request_error',
        'url_invalid',
        `Unrecognized request URL (${req.method}: ${req.path}). The local fake serves only what Yieldpoint uses.`,
      ),
    ),
  );

  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(opts.port ?? 0, '127.0.0.1', () => resolve(s));
    s.once('error', reject);
  });
  server.requestTimeout = 30_000;
  const port = (server.address() as AddressInfo).port;
  baseUrl = `http://127.0.0.1:${port}`;

  return {
    port,
    url: baseUrl,
    apiKey,
    setWebhookUrl: (u) => {
      webhookUrl = u;
    },
    adopt(s) {
      const price = find(s.priceId, 'price', 'price');
      if (!store.has(s.customerId))
        put({
          id: s.customerId,
          object: 'customer',
          created: now(),
          name: s.customerName,
          email: null,
          metadata: {},
          livemode: false,
          balance: 0,
          currency: null,
          delinquent: false,
          description: null,
          invoice_prefix: 'YPF',
        });
      if (store.has(s.subscriptionId)) return;
      const sub = makeSubscription(s.customerId, price, s.quantity, s.metadata, { id: s.subscriptionId, itemId: s.itemId });
      sub.status = s.status;
    },
    events: () => [...sent],
    get: (id) => store.get(id),
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
