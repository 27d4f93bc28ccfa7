import { z } from 'zod';

export const SubscriptionStatus = z.enum(['none', 'active', 'past_due', 'canceled']);
export type SubscriptionStatus = z.infer<typeof SubscriptionStatus>;

/** GET /api/billing: the site's licence as the payment provider's events last set it. */
export const BillingSummary = z.object({
  plan: z.string(),
  status: SubscriptionStatus,
  seats: z.number().int(),
  activeUsers: z.number().int(),
  pendingInvites: z.number().int(),
  /** Active users plus invites not yet accepted: what a new invite or a smaller seat count is checked against. */
  seatsInUse: z.number().int(),
  unitAmountCents: z.number().int(),
  currency: z.string(),
  currentPeriodEnd: z.string().nullable(),
  graceEndsAt: z.string().nullable(),
  isReadOnly: z.boolean(),
  canChangeSeats: z.boolean(),
});
export type BillingSummary = z.infer<typeof BillingSummary>;

export const Invoice = z.object({
  id: z.number().int(),
  number: z.string(),
  status: z.string(),
  currency: z.string(),
  amountDueCents: z.number().int(),
  amountPaidCents: z.number().int(),
  seats: z.number().int(),
  periodStart: z.string(),
  periodEnd: z.string(),
  issuedAt: z.string(),
  payUrl: z.string().nullable(),
});
export type Invoice = z.infer<typeof Invoice>;

export const InvoiceList = z.object({ invoices: z.array(Invoice) });
export type InvoiceList = z.infer<typeof InvoiceList>;

export const MAX_SEATS = 500;

/** POST /api/billing/checkout: seats to add; the answer is the payment page to send the browser to. */
export const BuySeats = z.strictObject({
  addSeats: z.coerce.number().int('Whole seats only').min(1, 'Add at least one seat').max(MAX_SEATS, `At most ${MAX_SEATS} seats`),
});
export type BuySeats = z.infer<typeof BuySeats>;

export const CheckoutStarted = z.object({ url: z.string().url() });
export type CheckoutStarted = z.infer<typeof CheckoutStarted>;

/** PATCH /api/billing/seats: the new total, never below the seats in use. */
export const ChangeSeats = z.strictObject({
  seats: z.coerce.number().int('Whole seats only').min(1, 'At least one seat').max(MAX_SEATS, `At most ${MAX_SEATS} seats`),
});
export type ChangeSeats = z.infer<typeof ChangeSeats>;
