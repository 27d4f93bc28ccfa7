import { and, desc, eq, lte } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { mailOutbox } from '../../db/tables';

export type MailRow = typeof mailOutbox.$inferSelect;
export type NewMail = typeof mailOutbox.$inferInsert;

export const insertMail = (db: Db, row: NewMail) => db.insert(mailOutbox).values(row).returning().then(returned);

export const listDueMail = (db: Db, nowIso: string, limit: number) =>
  db
    .select()
    .from(mailOutbox)
    .where(and(eq(mailOutbox.status, 'pending'), lte(mailOutbox.nextAttemptAt, nowIso)))
    .orderBy(mailOutbox.id)
    .limit(limit)
    .execute();

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
