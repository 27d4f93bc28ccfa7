import { and, eq, sql } from 'drizzle-orm';
import { preparedPer, first, returned, type Db } from '../../db/client';
import { sites, users } from '../../db/tables';
import type { Role } from '../../src/contracts/roles';

export type UserRow = typeof users.$inferSelect;

export const findUserByEmail = (db: Db, email: string) => db.select().from(users).where(eq(users.email, email)).then(first);

const userWithSite = preparedPer((db, _v, name) =>
  db
    .select({ user: users, siteName: sites.name, siteTimeZone: sites.timeZone, siteCurrency: sites.currency })
    .from(users)
    .innerJoin(sites, eq(users.siteId, sites.id))
    .where(eq(users.id, sql.placeholder('id')))
    .prepare(name),
);
export const findUserWithSite = (db: Db, id: number) => userWithSite(db).execute({ id }).then(first);

export const listSiteUsers = (db: Db, siteId: number) => db.select().from(users).where(eq(users.siteId, siteId)).orderBy(users.name).execute();

export const findSiteUser = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(users)
    .where(and(eq(users.siteId, siteId), eq(users.id, id)))
    .then(first);

export const updateUser = (db: Db, id: number, patch: Partial<Pick<UserRow, 'role' | 'isActive' | 'name' | 'cautionsAcknowledgedAt' | 'passwordHash'>>) =>
  db.update(users).set(patch).where(eq(users.id, id)).returning().then(returned);

export const countUsersByRole = (db: Db, siteId: number) =>
  db
    .select({
      role: users.role,
      n: sql<number>`count(*)`.mapWith(Number),
      active: sql<number>`sum(case when ${users.isActive} then 1 else 0 end)`.mapWith(Number),
    })
    .from(users)
    .where(eq(users.siteId, siteId))
    .groupBy(users.role)
    .execute();

export const insertUser = (db: Db, row: { siteId: number; email: string; name: string; role: Role; passwordHash: string }) =>
  db.insert(users).values(row).returning().then(returned);
