import { and, eq, isNull } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { sessions } from '../../db/schema';

export type SessionRow = typeof sessions.$inferSelect;

export const insertSession = (db: Db, row: typeof sessions.$inferInsert) => db.insert(sessions).values(row).run();

export const findSession = (db: Db, id: string) => db.select().from(sessions).where(eq(sessions.id, id)).get();

export const touchSession = (db: Db, id: string, at: string) =>
  db.update(sessions).set({ lastSeenAt: at }).where(eq(sessions.id, id)).run();

export const revokeSession = (db: Db, id: string, at: string) =>
  db.update(sessions).set({ revokedAt: at }).where(and(eq(sessions.id, id), isNull(sessions.revokedAt))).run();

export const revokeUserSessions = (db: Db, userId: number, at: string) =>
  db.update(sessions).set({ revokedAt: at }).where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt))).run();
