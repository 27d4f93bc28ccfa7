import { and, eq } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { enzymes, lots, recipes, vessels } from '../../db/tables';

export type RecipeRow = typeof recipes.$inferSelect;
export type RecipeValues = Omit<typeof recipes.$inferInsert, 'id' | 'siteId' | 'createdAt'>;

const joined = (db: Db) =>
  db
    .select({ recipe: recipes, enzymeName: enzymes.name, lotCode: lots.lotCode, vesselName: vessels.name })
    .from(recipes)
    .innerJoin(enzymes, eq(recipes.enzymeId, enzymes.id))
    .innerJoin(lots, eq(recipes.lotId, lots.id))
    .innerJoin(vessels, eq(recipes.vesselId, vessels.id));

export const listSiteRecipes = (db: Db, siteId: number) => joined(db).where(eq(recipes.siteId, siteId)).orderBy(recipes.name).execute();

export const findSiteRecipe = (db: Db, siteId: number, id: number) =>
  joined(db)
    .where(and(eq(recipes.siteId, siteId), eq(recipes.id, id)))
    .then(first);

export const findSiteRecipeByName = (db: Db, siteId: number, name: string) =>
  db
    .select()
    .from(recipes)
    .where(and(eq(recipes.siteId, siteId), eq(recipes.name, name)))
    .then(first);

export const insertRecipe = (db: Db, siteId: number, v: RecipeValues) =>
  db
    .insert(recipes)
    .values({ ...v, siteId })
    .returning()
    .then(returned);

export const updateRecipe = (db: Db, id: number, v: Partial<RecipeValues>) => db.update(recipes).set(v).where(eq(recipes.id, id)).returning().then(returned);

// Planning reads of the catalogue, scoped by site like every query here.
export const findSiteLot = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(lots)
    .where(and(eq(lots.siteId, siteId), eq(lots.id, id)))
    .then(first);

export const findSiteEnzyme = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(enzymes)
    .where(and(eq(enzymes.siteId, siteId), eq(enzymes.id, id)))
    .then(first);

export const listAcceptedLots = (db: Db, siteId: number, enzymeId: number) =>
  db
    .select()
    .from(lots)
    .where(and(eq(lots.siteId, siteId), eq(lots.enzymeId, enzymeId), eq(lots.status, 'accepted')))
    .orderBy(lots.receivedOn)
    .execute();
