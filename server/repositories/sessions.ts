import { and, eq, isNull, ne, sql } from 'drizzle-orm';
import { databaseOf, preparedPer, first, sessionTablesVersion, type Db } from '../../db/client';
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

type SessionWithUser = Awaited<ReturnType<typeof findSessionWithUser>>;
const KEPT_MAX = 10_000;
// A row kept longer than this is read again even if no change was announced (a backstop, not the rule).
const KEPT_MS = 10_000;
const kept = new WeakMap<object, Map<string, { row: SessionWithUser; version: number; at: number }>>();

/**
 * findSessionWithUser for the session check of every request. On PostgreSQL the row is kept while the tables it
 * joins are unchanged (sessionTablesVersion: a trigger announces every change, from any process), so most
 * requests make one round trip to the database, not two; a sign-out, role change or deactivation ends the
 * session in this process at once and in the others once PostgreSQL delivers the notification (milliseconds).
 * On SQLite, and while the notifications are not being heard, every check reads the row.
 */
export async function sessionWithUserNow(db: Db, id: string): Promise<SessionWithUser> {
  // The version before the read: a change committed while it runs leaves the row unkept.
  const version = sessionTablesVersion(db);
  if (version === null) return await findSessionWithUser(db, id);
  let rows = kept.get(databaseOf(db));
  if (!rows) kept.set(databaseOf(db), (rows = new Map()));
  const hit = rows.get(id);
  if (hit && hit.version === version && performance.now() - hit.at < KEPT_MS) return hit.row;
  const row = await findSessionWithUser(db, id);
  if (sessionTablesVersion(db) !== version) return row;
  rows.delete(id);
  rows.set(id, { row, version, at: performance.now() });
  if (rows.size > KEPT_MAX) rows.delete(rows.keys().next().value!);
  return row;
}

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
