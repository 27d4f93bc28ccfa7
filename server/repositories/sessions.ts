import { and, eq, isNull, ne, sql } from 'drizzle-orm';
import { preparedPer, type Db } from '../../db/client';
import { sessions, sites, users } from '../../db/schema';

export const insertSession = (db: Db, row: typeof sessions.$inferInsert) => db.insert(sessions).values(row).run();

// The session check on every request: the session row with its user and site in one statement.
const sessionWithUser = preparedPer((db) =>
  db
    .select({ session: sessions, user: users, siteName: sites.name, siteTimeZone: sites.timeZone, siteCurrency: sites.currency })
    .from(sessions)
    .innerJoin(users, eq(sessions.userId, users.id))
    .innerJoin(sites, eq(users.siteId, sites.id))
    .where(eq(sessions.id, sql.placeholder('id')))
    .prepare(),
);
export const findSessionWithUser = (db: Db, id: string) => sessionWithUser(db).get({ id });

export const touchSession = (db: Db, id: string, at: string) => db.update(sessions).set({ lastSeenAt: at }).where(eq(sessions.id, id)).run();

export const revokeSession = (db: Db, id: string, at: string) =>
  db
    .update(sessions)
    .set({ revokedAt: at })
    .where(and(eq(sessions.id, id), isNull(sessions.revokedAt)))
    .run();

export const revokeUserSessions = (db: Db, userId: number, at: string) =>
  db
    .update(sessions)
    .set({ revokedAt: at })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt)))
    .run();

export const revokeOtherSessions = (db: Db, userId: number, keepId: string, at: string) =>
  db
    .update(sessions)
    .set({ revokedAt: at })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt), ne(sessions.id, keepId)))
    .run();
