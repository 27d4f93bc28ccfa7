import { and, eq, isNull, sql } from 'drizzle-orm';
import { preparedPer, type Db } from '../../db/client';
import { sessions } from '../../db/schema';

export type SessionRow = typeof sessions.$inferSelect;

export const insertSession = (db: Db, row: typeof sessions.$inferInsert) => db.insert(sessions).values(row).run();

const sessionById = preparedPer((db) => db.select().from(sessions).where(eq(sessions.id, sql.placeholder('id'))).prepare());
export const findSession = (db: Db, id: string) => sessionById(db).get({ id });

export const touchSession = (db: Db, id: string, at: string) =>
  db.update(sessions).set({ lastSeenAt: at }).where(eq(sessions.id, id)).run();

export const revokeSession = (db: Db, id: string, at: string) =>
  db.update(sessions).set({ revokedAt: at }).where(and(eq(sessions.id, id), isNull(sessions.revokedAt))).run();

export const revokeUserSessions = (db: Db, userId: number, at: string) =>
  db.update(sessions).set({ revokedAt: at }).where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt))).run();
