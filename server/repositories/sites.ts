import { eq, sql } from 'drizzle-orm';
import { first, type Db } from '../../db/client';
import { enzymes, lots, sites, vessels } from '../../db/tables';

/** The first site (the one `npm start` seeds), if any. */
export const firstSite = (db: Db) => db.select().from(sites).orderBy(sites.id).limit(1).then(first);

export const findSite = (db: Db, id: number) => db.select().from(sites).where(eq(sites.id, id)).then(first);

export const updateSite = (db: Db, id: number, patch: Partial<Pick<typeof sites.$inferInsert, 'currency'>>) =>
  db.update(sites).set(patch).where(eq(sites.id, id)).execute();

const count = async (db: Db, table: typeof vessels | typeof enzymes | typeof lots, siteId: number) =>
  (
    await db
      .select({ n: sql<number>`count(*)`.mapWith(Number) })
      .from(table)
      .where(eq(table.siteId, siteId))
      .then(first)
  )?.n ?? 0;

export const countSiteRecords = async (db: Db, siteId: number) => ({
  vessels: await count(db, vessels, siteId),
  enzymes: await count(db, enzymes, siteId),
  lots: await count(db, lots, siteId),
  quarantinedLots:
    (
      await db
        .select({ n: sql<number>`count(*)`.mapWith(Number) })
        .from(lots)
        .where(sql`${lots.siteId} = ${siteId} and ${lots.status} = 'quarantined'`)
        .then(first)
    )?.n ?? 0,
});
