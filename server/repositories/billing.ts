import { and, desc, eq, gt, isNull, isNotNull, sql } from 'drizzle-orm';
import { preparedPer, type Db } from '../../db/client';
import { billingEvents, invites, invoices, subscriptions, users } from '../../db/schema';

export type SubscriptionRow = typeof subscriptions.$inferSelect;
export type InvoiceRow = typeof invoices.$inferSelect;
export type InviteRow = typeof invites.$inferSelect;

const subscriptionOfSite = preparedPer((db) =>
  db
    .select()
    .from(subscriptions)
    .where(eq(subscriptions.siteId, sql.placeholder('siteId')))
    .prepare(),
);
export const findSubscription = (db: Db, siteId: number) => subscriptionOfSite(db).get({ siteId });

export const findSubscriptionByCustomer = (db: Db, customerId: string) =>
  db.select().from(subscriptions).where(eq(subscriptions.stripeCustomerId, customerId)).get();

export const listLinkedSubscriptions = (db: Db) =>
  db
    .select()
    .from(subscriptions)
    .where(and(isNotNull(subscriptions.stripeSubscriptionId), isNotNull(subscriptions.stripeCustomerId)))
    .all();

export const upsertSubscription = (db: Db, row: typeof subscriptions.$inferInsert) =>
  db.insert(subscriptions).values(row).onConflictDoUpdate({ target: subscriptions.siteId, set: row }).returning().get();

export const listSiteInvoices = (db: Db, siteId: number) =>
  db.select().from(invoices).where(eq(invoices.siteId, siteId)).orderBy(desc(invoices.issuedAt), desc(invoices.id)).limit(100).all();

export const upsertInvoice = (db: Db, row: typeof invoices.$inferInsert) =>
  db.insert(invoices).values(row).onConflictDoUpdate({ target: invoices.stripeInvoiceId, set: row }).returning().get();

/** Claims an event id; false when it was already claimed, so its effects are never applied twice. */
export const claimEvent = (db: Db, row: typeof billingEvents.$inferInsert) =>
  db.insert(billingEvents).values(row).onConflictDoNothing().returning().get() !== undefined;

export const isEventClaimed = (db: Db, eventId: string) => db.select().from(billingEvents).where(eq(billingEvents.eventId, eventId)).get() !== undefined;

export const countActiveUsers = (db: Db, siteId: number) =>
  db
    .select({ n: sql<number>`count(*)` })
    .from(users)
    .where(and(eq(users.siteId, siteId), eq(users.isActive, true)))
    .get()?.n ?? 0;

const openInvite = (siteId: number, nowIso: string) =>
  and(eq(invites.siteId, siteId), isNull(invites.acceptedAt), isNull(invites.revokedAt), gt(invites.expiresAt, nowIso));

export const countOpenInvites = (db: Db, siteId: number, nowIso: string) =>
  db
    .select({ n: sql<number>`count(*)` })
    .from(invites)
    .where(openInvite(siteId, nowIso))
    .get()?.n ?? 0;

export const listOpenInvites = (db: Db, siteId: number, nowIso: string) =>
  db.select().from(invites).where(openInvite(siteId, nowIso)).orderBy(desc(invites.id)).all();

export const insertInvite = (db: Db, row: typeof invites.$inferInsert) => db.insert(invites).values(row).returning().get();

export const findInviteByTokenHash = (db: Db, tokenHash: string) => db.select().from(invites).where(eq(invites.tokenHash, tokenHash)).get();

export const findSiteInvite = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(invites)
    .where(and(eq(invites.siteId, siteId), eq(invites.id, id)))
    .get();

export const updateInvite = (db: Db, id: number, patch: Partial<Pick<InviteRow, 'acceptedAt' | 'revokedAt' | 'userId'>>) =>
  db.update(invites).set(patch).where(eq(invites.id, id)).returning().get();

export const findOpenInviteByEmail = (db: Db, email: string, nowIso: string) =>
  db
    .select()
    .from(invites)
    .where(and(eq(invites.email, email), isNull(invites.acceptedAt), isNull(invites.revokedAt), gt(invites.expiresAt, nowIso)))
    .get();
