import { and, eq, isNull, ne, sql } from 'drizzle-orm';
import { preparedPer, first, type Db } from '../../db/client';
import { sessions, sites, users } from '../../db/tables';

export const insertSession = (db: Db, row: typeof sessions.$inferInsert) => db.insert(sessions).values(row).execute();

// The session check on every request: the session row with its user and site in one statement.
const sessionWithUser = preparedPer((db, _v, name) =>
  db
    .select({ session: sessions, user: users, siteName: sites.name, siteTimeZone: sites.timeZone, siteCurrency: sites.currency })
    .from(sessions)
    .innerJoin(users, eq(sessions.userId, users.id))
    .innerJoin(sites, eq(users.siteId, sites.id))
    .where(eq(sessions.id, sql.placeholder('id')))
    .prepare(name),
);
export const findSessionWithUser = (db: Db, id: string) => sessionWithUser(db).execute({ id }).then(first);

export const touchSession = (db: Db, id: string, at: string) => db.update(sessions).set({ lastSeenAt: at }).where(eq(sessions.id, id)).execute();

export const revokeSession = (db: Db, id: string, at: string) =>
  db
    .update(sessions)
    .set({ revokedAt: at })
    .where(and(eq(sessions.id, id), isNull(sessions.revokedAt)))
    .execute();

export const revokeUserSessions = (db: Db, userId: number, at: string) =>
  db
    .update(sessions)
    .set({ revokedAt: at })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt)))
    .execute();

export const revokeOtherSessions = (db: Db, userId: number, keepId: string, at: string) =>
  db
    .update(sessions)
    .set({ revokedAt: at })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt), ne(sessions.id, keepId)))
    .execute();
