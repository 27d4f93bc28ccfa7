import { and, desc, eq, inArray, lte } from 'drizzle-orm';
import { first, returned, writeTx, type Db } from '../../db/client';
import { databaseDialect, mailOutbox } from '../../db/tables';

export type MailRow = typeof mailOutbox.$inferSelect;
export type NewMail = typeof mailOutbox.$inferInsert;

export const insertMail = (db: Db, row: NewMail) => db.insert(mailOutbox).values(row).returning().then(returned);

/**
 * Claims up to `limit` due messages for one sender: their next attempt moves to `leaseUntilIso`, so no other
 * server process's sender takes them meanwhile, and a sender that stops mid-send leaves them to be sent once the
 * lease ends (at least once, never lost). On PostgreSQL, rows another sender is claiming right now are skipped,
 * not waited for (FOR UPDATE SKIP LOCKED); SQLite has one writer, so nothing is skipped.
 */
export const claimDueMail = (db: Db, nowIso: string, leaseUntilIso: string, limit: number): Promise<MailRow[]> =>
  writeTx(db, async (tx) => {
    const due = tx
      .select({ id: mailOutbox.id })
      .from(mailOutbox)
      .where(and(eq(mailOutbox.status, 'pending'), lte(mailOutbox.nextAttemptAt, nowIso)))
      .orderBy(mailOutbox.id)
      .limit(limit);
    const ids = (await (databaseDialect === 'postgres' ? due.for('update', { skipLocked: true }) : due)).map((r) => r.id);
    if (!ids.length) return [];
    const rows = await tx.update(mailOutbox).set({ nextAttemptAt: leaseUntilIso }).where(inArray(mailOutbox.id, ids)).returning();
    return rows.sort((a, b) => a.id - b.id);
  });

export const updateMail = (db: Db, id: number, patch: Partial<Pick<MailRow, 'status' | 'attempts' | 'lastError' | 'nextAttemptAt' | 'sentAt'>>) =>
  db.update(mailOutbox).set(patch).where(eq(mailOutbox.id, id)).returning().then(returned);

export const listSiteMail = (db: Db, siteId: number, limit: number) =>
  db.select().from(mailOutbox).where(eq(mailOutbox.siteId, siteId)).orderBy(desc(mailOutbox.id)).limit(limit).execute();

export const findSiteMail = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(mailOutbox)
    .where(and(eq(mailOutbox.siteId, siteId), eq(mailOutbox.id, id)))
    .then(first);
