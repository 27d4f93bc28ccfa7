import { and, eq, sql } from 'drizzle-orm';
import { preparedPer, type Db } from '../../db/client';
import { sites, users } from '../../db/schema';
import type { Role } from '../../src/contracts/roles';

export type UserRow = typeof users.$inferSelect;

export const findUserByEmail = (db: Db, email: string) => db.select().from(users).where(eq(users.email, email)).get();

const userWithSite = preparedPer((db) =>
  db
    .select({ user: users, siteName: sites.name, siteTimeZone: sites.timeZone, siteCurrency: sites.currency })
    .from(users)
    .innerJoin(sites, eq(users.siteId, sites.id))
    .where(eq(users.id, sql.placeholder('id')))
    .prepare(),
);
export const findUserWithSite = (db: Db, id: number) => userWithSite(db).get({ id });

export const listSiteUsers = (db: Db, siteId: number) => db.select().from(users).where(eq(users.siteId, siteId)).orderBy(users.name).all();

export const findSiteUser = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(users)
    .where(and(eq(users.siteId, siteId), eq(users.id, id)))
    .get();

export const updateUser = (db: Db, id: number, patch: Partial<Pick<UserRow, 'role' | 'isActive' | 'name' | 'cautionsAcknowledgedAt' | 'passwordHash'>>) =>
  db.update(users).set(patch).where(eq(users.id, id)).returning().get();

export const countUsersByRole = (db: Db, siteId: number) =>
  db
    .select({ role: users.role, n: sql<number>`count(*)`, active: sql<number>`sum(${users.isActive})` })
    .from(users)
    .where(eq(users.siteId, siteId))
    .groupBy(users.role)
    .all();

export const insertUser = (db: Db, row: { siteId: number; email: string; name: string; role: Role; passwordHash: string }) =>
  db.insert(users).values(row).returning().get();
