import { and, desc, eq } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { lots, plans, recipes, users, vessels } from '../../db/tables';

export type PlanRow = typeof plans.$inferSelect;

const joined = (db: Db) =>
  db
    .select({ plan: plans, recipeName: recipes.name, lotCode: lots.lotCode, vesselName: vessels.name, createdBy: users.name })
    .from(plans)
    .innerJoin(recipes, eq(plans.recipeId, recipes.id))
    .innerJoin(lots, eq(plans.lotId, lots.id))
    .innerJoin(vessels, eq(recipes.vesselId, vessels.id))
    .innerJoin(users, eq(plans.createdBy, users.id));

export type PlanJoined = NonNullable<Awaited<ReturnType<typeof findSitePlan>>>;

export const findSitePlan = (db: Db, siteId: number, id: number) =>
  joined(db)
    .where(and(eq(plans.siteId, siteId), eq(plans.id, id)))
    .then(first);

export const listSitePlans = (db: Db, siteId: number, recipeId?: number) =>
  joined(db)
    .where(recipeId === undefined ? eq(plans.siteId, siteId) : and(eq(plans.siteId, siteId), eq(plans.recipeId, recipeId)))
    .orderBy(desc(plans.id))
    .limit(200)
    .execute();

// Insert only: there is deliberately no update or delete for plans.
export const insertPlan = (db: Db, row: Omit<typeof plans.$inferInsert, 'id'>) => db.insert(plans).values(row).returning().then(returned);
