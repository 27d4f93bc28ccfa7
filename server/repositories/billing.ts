import { and, desc, eq, gt, isNull, isNotNull, sql } from 'drizzle-orm';
import { preparedPer, first, returned, type Db } from '../../db/client';
import { billingEvents, invites, invoices, subscriptions, users } from '../../db/tables';

export type SubscriptionRow = typeof subscriptions.$inferSelect;
export type InvoiceRow = typeof invoices.$inferSelect;
export type InviteRow = typeof invites.$inferSelect;

const subscriptionOfSite = preparedPer((db, _v, name) =>
  db
    .select()
    .from(subscriptions)
    .where(eq(subscriptions.siteId, sql.placeholder('siteId')))
    .prepare(name),
);
export const findSubscription = (db: Db, siteId: number) => subscriptionOfSite(db).execute({ siteId }).then(first);

export const findSubscriptionByCustomer = (db: Db, customerId: string) =>
  db.select().from(subscriptions).where(eq(subscriptions.stripeCustomerId, customerId)).then(first);

export const listLinkedSubscriptions = (db: Db) =>
  db
    .select()
    .from(subscriptions)
    .where(and(isNotNull(subscriptions.stripeSubscriptionId), isNotNull(subscriptions.stripeCustomerId)))
    .execute();

export const upsertSubscription = (db: Db, row: typeof subscriptions.$inferInsert) =>
  db.insert(subscriptions).values(row).onConflictDoUpdate({ target: subscriptions.siteId, set: row }).returning().then(returned);

export const listSiteInvoices = (db: Db, siteId: number) =>
  db.select().from(invoices).where(eq(invoices.siteId, siteId)).orderBy(desc(invoices.issuedAt), desc(invoices.id)).limit(100).execute();

export const upsertInvoice = (db: Db, row: typeof invoices.$inferInsert) =>
  db.insert(invoices).values(row).onConflictDoUpdate({ target: invoices.stripeInvoiceId, set: row }).returning().then(returned);

/** Claims an event id; false when it was already claimed, so its effects are never applied twice. */
export const claimEvent = async (db: Db, row: typeof billingEvents.$inferInsert) =>
  (await db.insert(billingEvents).values(row).onConflictDoNothing().returning().then(returned)) !== undefined;

export const isEventClaimed = async (db: Db, eventId: string) =>
  (await db.select().from(billingEvents).where(eq(billingEvents.eventId, eventId)).then(first)) !== undefined;

export const countActiveUsers = async (db: Db, siteId: number) =>
  (
    await db
      .select({ n: sql<number>`count(*)`.mapWith(Number) })
      .from(users)
      .where(and(eq(users.siteId, siteId), eq(users.isActive, true)))
      .then(first)
  )?.n ?? 0;

const openInvite = (siteId: number, nowIso: string) =>
  and(eq(invites.siteId, siteId), isNull(invites.acceptedAt), isNull(invites.revokedAt), gt(invites.expiresAt, nowIso));

export const countOpenInvites = async (db: Db, siteId: number, nowIso: string) =>
  (
    await db
      .select({ n: sql<number>`count(*)`.mapWith(Number) })
      .from(invites)
      .where(openInvite(siteId, nowIso))
      .then(first)
  )?.n ?? 0;

export const listOpenInvites = (db: Db, siteId: number, nowIso: string) =>
  db.select().from(invites).where(openInvite(siteId, nowIso)).orderBy(desc(invites.id)).execute();

export const insertInvite = (db: Db, row: typeof invites.$inferInsert) => db.insert(invites).values(row).returning().then(returned);

export const findInviteByTokenHash = (db: Db, tokenHash: string) => db.select().from(invites).where(eq(invites.tokenHash, tokenHash)).then(first);

export const findSiteInvite = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(invites)
    .where(and(eq(invites.siteId, siteId), eq(invites.id, id)))
    .then(first);

export const updateInvite = (db: Db, id: number, patch: Partial<Pick<InviteRow, 'acceptedAt' | 'revokedAt' | 'userId'>>) =>
  db.update(invites).set(patch).where(eq(invites.id, id)).returning().then(returned);

export const findOpenInviteByEmail = (db: Db, email: string, nowIso: string) =>
  db
    .select()
    .from(invites)
    .where(and(eq(invites.email, email), isNull(invites.acceptedAt), isNull(invites.revokedAt), gt(invites.expiresAt, nowIso)))
    .then(first);
