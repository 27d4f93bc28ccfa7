import Stripe from 'stripe';

/** The seat's list price: invented for Yieldpoint, created once in the payment account under a lookup key. */
export const SEAT_PRICE = {
  lookupKey: 'yieldpoint_seat_monthly',
  unitAmountCents: 4900,
  currency: 'eur',
  productName: 'Yieldpoint seat',
  nickname: 'Yieldpoint seat, monthly',
} as const;
export const PLAN_NAME = 'Per seat, billed monthly';

export type SeatPrice = { priceId: string; productId: string; unitAmountCents: number; currency: string };

/** The payment provider as the app uses it: the SDK client, the webhook secret, the seat price and its pages. */
export type Billing = { stripe: Stripe; webhookSecret: string; seatPrice(): Promise<SeatPrice>; payOrigins: readonly string[] };

/** A pay link only when it points at one of the provider's own pages (https, or the local fake); else null. */
export function providerPayUrl(billing: Pick<Billing, 'payOrigins'> | null, url: string | null | undefined): string | null {
  if (!url || !billing) return null;
  let origin: string;
  try {
    origin = new URL(url).origin;
  } catch {
    return null;
  }
  return billing.payOrigins.includes(origin) ? url : null;
}

/**
 * The official SDK; `api` points it at another server (the local fake). Without it the SDK talks to Stripe
 * itself, so moving to real Stripe is only a key and a webhook secret.
 */
export function stripeClient(secretKey: string, api?: { host: string; port: number; protocol: 'http' | 'https' }): Stripe {
  return new Stripe(secretKey, { ...(api ?? {}), maxNetworkRetries: 2, timeout: 20_000, telemetry: false });
}

export function createBilling(stripe: Stripe, webhookSecret: string, payOrigins: readonly string[]): Billing {
  let price: Promise<SeatPrice> | null = null;
  const lookUp = async (): Promise<SeatPrice> => {
    const found = await stripe.prices.list({ lookup_keys: [SEAT_PRICE.lookupKey], limit: 1 });
    const existing = found.data[0];
    if (existing)
      return {
        priceId: existing.id,
        productId: typeof existing.product === 'string' ? existing.product : existing.product.id,
        unitAmountCents: existing.unit_amount ?? 0,
        currency: existing.currency,
      };
    const product = await stripe.products.create({ name: SEAT_PRICE.productName }, { idempotencyKey: 'yieldpoint-seat-product-v1' });
    const created = await stripe.prices.create(
      {
        product: product.id,
        unit_amount: SEAT_PRICE.unitAmountCents,
        currency: SEAT_PRICE.currency,
        recurring: { interval: 'month' },
        lookup_key: SEAT_PRICE.lookupKey,
        nickname: SEAT_PRICE.nickname,
      },
      { idempotencyKey: 'yieldpoint-seat-price-v1' },
    );
    return { priceId: created.id, productId: product.id, unitAmountCents: created.unit_amount ?? 0, currency: created.currency };
  };
  return {
    stripe,
    webhookSecret,
    payOrigins,
    seatPrice() {
      // A failed look-up is not cached: the next call tries again.
      price ??= lookUp().catch((e) => {
        price = null;
        throw e;
      });
      return price;
    },
  };
}
