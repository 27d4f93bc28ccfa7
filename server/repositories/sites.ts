import { eq, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { enzymes, lots, sites, vessels } from '../../db/schema';

/** The first site (the one `npm start` seeds), if any. */
export const firstSite = (db: Db) => db.select().from(sites).orderBy(sites.id).limit(1).get();

export const findSite = (db: Db, id: number) => db.select().from(sites).where(eq(sites.id, id)).get();

export const updateSite = (db: Db, id: number, patch: Partial<Pick<typeof sites.$inferInsert, 'currency'>>) =>
  db.update(sites).set(patch).where(eq(sites.id, id)).run();

const count = (db: Db, table: typeof vessels | typeof enzymes | typeof lots, siteId: number) =>
  db
    .select({ n: sql<number>`count(*)` })
    .from(table)
    .where(eq(table.siteId, siteId))
    .get()?.n ?? 0;

export const countSiteRecords = (db: Db, siteId: number) => ({
  vessels: count(db, vessels, siteId),
  enzymes: count(db, enzymes, siteId),
  lots: count(db, lots, siteId),
  quarantinedLots:
    db
      .select({ n: sql<number>`count(*)` })
      .from(lots)
      .where(sql`${lots.siteId} = ${siteId} and ${lots.status} = 'quarantined'`)
      .get()?.n ?? 0,
});
