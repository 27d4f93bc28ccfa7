import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { ROLES } from '../../src/enums';
import { createdAt, sites, users } from './core';

// none: the site has a payment customer but no paid plan yet.
export const SUBSCRIPTION_STATUSES = ['none', 'active', 'past_due', 'canceled'] as const;

/** A site's licence: the seat count is written only from verified payment-provider events. */
export const subscriptions = sqliteTable('subscriptions', {
  siteId: integer('site_id')
    .primaryKey()
    .references(() => sites.id),
  plan: text('plan').notNull(),
  seats: integer('seats').notNull(),
  status: text('status', { enum: SUBSCRIPTION_STATUSES }).notNull(),
  // Set when a payment fails: writes stay allowed until then, the site is read-only after it.
  graceEndsAt: text('grace_ends_at'),
  currentPeriodEnd: text('current_period_end'),
  stripeCustomerId: text('stripe_customer_id'),
  stripeSubscriptionId: text('stripe_subscription_id'),
  stripeItemId: text('stripe_item_id'),
  // `created` of the last subscription event applied, so an older event delivered late changes nothing.
  lastEventCreated: integer('last_event_created').notNull().default(0),
  updatedAt: text('updated_at').notNull(),
});

export const invoices = sqliteTable(
  'invoices',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    stripeInvoiceId: text('stripe_invoice_id').notNull(),
    number: text('number').notNull(),
    status: text('status').notNull(),
    currency: text('currency').notNull(),
    amountDueCents: integer('amount_due_cents').notNull(),
    amountPaidCents: integer('amount_paid_cents').notNull(),
    seats: integer('seats').notNull(),
    periodStart: text('period_start').notNull(),
    periodEnd: text('period_end').notNull(),
    hostedUrl: text('hosted_url'),
    issuedAt: text('issued_at').notNull(),
  },
  (t) => [uniqueIndex('invoices_stripe_unique').on(t.stripeInvoiceId), index('invoices_site_idx').on(t.siteId, t.issuedAt)],
);

/** Every webhook event id applied once: a redelivery finds its id here and changes nothing. */
export const billingEvents = sqliteTable('billing_events', {
  eventId: text('event_id').primaryKey(),
  type: text('type').notNull(),
  siteId: integer('site_id'),
  receivedAt: text('received_at').notNull(),
});

export const invites = sqliteTable(
  'invites',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    email: text('email').notNull(),
    role: text('role', { enum: ROLES }).notNull(),
    // Only the SHA-256 of the link's token is stored: a database reader cannot use a pending invite.
    tokenHash: text('token_hash').notNull(),
    invitedBy: integer('invited_by')
      .notNull()
      .references(() => users.id),
    expiresAt: text('expires_at').notNull(),
    acceptedAt: text('accepted_at'),
    revokedAt: text('revoked_at'),
    userId: integer('user_id').references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('invites_token_unique').on(t.tokenHash), index('invites_site_idx').on(t.siteId)],
);
