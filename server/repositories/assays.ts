import { and, asc, desc, eq } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { assayPoints, assays, users } from '../../db/tables';

export type AssayRow = typeof assays.$inferSelect;
export type NewAssayRow = Omit<typeof assays.$inferInsert, 'id'>;
export type NewPoint = Omit<typeof assayPoints.$inferInsert, 'id' | 'assayId'>;

// SQLite binds at most 32,766 parameters per statement; 6 per point leaves room in chunks of 2,000.
const CHUNK = 2_000;

/** Inserts an assay and all its points; call inside the write's transaction. */
export async function insertAssay(db: Db, row: NewAssayRow, points: readonly NewPoint[]): Promise<AssayRow> {
  const assay = await db.insert(assays).values(row).returning().then(returned);
  for (let i = 0; i < points.length; i += CHUNK) {
    await db
      .insert(assayPoints)
      .values(points.slice(i, i + CHUNK).map((p) => ({ ...p, assayId: assay.id })))
      .execute();
  }
  return assay;
}

export const listLotAssays = (db: Db, siteId: number, lotId: number) =>
  db
    .select({ assay: assays, createdBy: users.name })
    .from(assays)
    .leftJoin(users, eq(assays.createdBy, users.id))
    .where(and(eq(assays.siteId, siteId), eq(assays.lotId, lotId)))
    .orderBy(desc(assays.createdAt), desc(assays.id))
    .execute();

export const findLotAssay = (db: Db, siteId: number, lotId: number, assayId: number) =>
  db
    .select()
    .from(assays)
    .where(and(eq(assays.siteId, siteId), eq(assays.lotId, lotId), eq(assays.id, assayId)))
    .then(first);

export const listAssayPoints = (db: Db, assayId: number, limit?: number) => {
  const q = db.select().from(assayPoints).where(eq(assayPoints.assayId, assayId)).orderBy(asc(assayPoints.line));
  return (limit ? q.limit(limit) : q).execute();
};

/** Newest fitted assay of each lot of a site, for lists and history. */
export const listSiteFits = (db: Db, siteId: number) =>
  db
    .select({ lotId: assays.lotId, fit: assays.fit, id: assays.id, createdAt: assays.createdAt })
    .from(assays)
    .where(eq(assays.siteId, siteId))
    .orderBy(desc(assays.createdAt), desc(assays.id))
    .execute();
