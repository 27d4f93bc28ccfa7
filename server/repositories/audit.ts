import { and, asc, desc, eq, isNull } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { auditEvents } from '../../db/schema';

export type AuditRow = typeof auditEvents.$inferSelect;

const sameSite = (siteId: number | null) => (siteId === null ? isNull(auditEvents.siteId) : eq(auditEvents.siteId, siteId));

export const lastAuditHash = (db: Db, siteId: number | null) =>
  db.select({ hash: auditEvents.hash }).from(auditEvents).where(sameSite(siteId)).orderBy(desc(auditEvents.id)).limit(1).get()?.hash;

export const insertAudit = (db: Db, row: typeof auditEvents.$inferInsert) => db.insert(auditEvents).values(row).returning().get();

export const listAudit = (db: Db, siteId: number | null, opts: { action?: string; limit?: number } = {}) =>
  db
    .select()
    .from(auditEvents)
    .where(opts.action ? and(sameSite(siteId), eq(auditEvents.action, opts.action)) : sameSite(siteId))
    .orderBy(asc(auditEvents.id))
    .limit(opts.limit ?? 1_000_000)
    .all();
