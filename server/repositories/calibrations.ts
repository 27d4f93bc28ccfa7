import { and, asc, desc, eq, isNotNull } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { assays, batches, calibrationExclusions, calibrationSettings, calibrations, users } from '../../db/tables';

export type CalibrationRow = typeof calibrations.$inferSelect;

const joined = (db: Db) =>
  db.select({ calibration: calibrations, decidedBy: users.name }).from(calibrations).leftJoin(users, eq(calibrations.decidedBy, users.id));
export type CalibrationJoined = NonNullable<Awaited<ReturnType<typeof findSiteCalibration>>>;

export const findSiteCalibration = (db: Db, siteId: number, id: number) =>
  joined(db)
    .where(and(eq(calibrations.siteId, siteId), eq(calibrations.id, id)))
    .then(first);

/** The newest calibration of a recipe and lot in a state (at most one is proposed and one accepted at a time). */
export const findCalibration = (db: Db, siteId: number, recipeId: number, lotId: number, state: CalibrationRow['state']) =>
  joined(db)
    .where(and(eq(calibrations.siteId, siteId), eq(calibrations.recipeId, recipeId), eq(calibrations.lotId, lotId), eq(calibrations.state, state)))
    .orderBy(desc(calibrations.id))
    .then(first);

export const insertCalibration = (db: Db, row: Omit<typeof calibrations.$inferInsert, 'id'>) => db.insert(calibrations).values(row).returning().then(returned);

export const setCalibrationState = (db: Db, id: number, patch: Pick<CalibrationRow, 'state'> & Partial<Pick<CalibrationRow, 'decidedBy' | 'decidedAt'>>) =>
  db.update(calibrations).set(patch).where(eq(calibrations.id, id)).execute();

/** Every proposed (or accepted) row of a recipe and lot, to supersede when a newer one takes its place. */
export const calibrationIdsIn = async (db: Db, siteId: number, recipeId: number, lotId: number, state: CalibrationRow['state']) =>
  (
    await db
      .select({ id: calibrations.id })
      .from(calibrations)
      .where(and(eq(calibrations.siteId, siteId), eq(calibrations.recipeId, recipeId), eq(calibrations.lotId, lotId), eq(calibrations.state, state)))
      .execute()
  ).map((r) => r.id);

/** Closed batches of a recipe on a lot, in closing order. */
export const closedBatchesOf = (db: Db, siteId: number, recipeId: number, lotId: number) =>
  db
    .select()
    .from(batches)
    .where(and(eq(batches.siteId, siteId), eq(batches.recipeId, recipeId), eq(batches.lotId, lotId), eq(batches.state, 'closed'), isNotNull(batches.closedAt)))
    .orderBy(asc(batches.closedAt), asc(batches.id))
    .execute();

export const listExclusions = (db: Db, siteId: number) =>
  db
    .select({ batchId: calibrationExclusions.batchId, reason: calibrationExclusions.reason, by: users.name, at: calibrationExclusions.excludedAt })
    .from(calibrationExclusions)
    .innerJoin(users, eq(calibrationExclusions.excludedBy, users.id))
    .where(eq(calibrationExclusions.siteId, siteId))
    .execute();

export const findExclusion = (db: Db, batchId: number) => db.select().from(calibrationExclusions).where(eq(calibrationExclusions.batchId, batchId)).then(first);

export const insertExclusion = (db: Db, row: Omit<typeof calibrationExclusions.$inferInsert, 'id' | 'createdAt'>) =>
  db.insert(calibrationExclusions).values(row).execute();

export const deleteExclusion = (db: Db, batchId: number) => db.delete(calibrationExclusions).where(eq(calibrationExclusions.batchId, batchId)).execute();

/** The lot's newest assay with a fit: the one planning uses. */
export const newestLotFit = (db: Db, siteId: number, lotId: number) =>
  db
    .select({ id: assays.id, createdAt: assays.createdAt, fit: assays.fit })
    .from(assays)
    .where(and(eq(assays.siteId, siteId), eq(assays.lotId, lotId), isNotNull(assays.fit)))
    .orderBy(desc(assays.createdAt), desc(assays.id))
    .then(first);

export const findCalibrationSettings = (db: Db, siteId: number) =>
  db.select().from(calibrationSettings).where(eq(calibrationSettings.siteId, siteId)).then(first);

export const upsertCalibrationSettings = (db: Db, row: typeof calibrationSettings.$inferInsert) =>
  db
    .insert(calibrationSettings)
    .values(row)
    .onConflictDoUpdate({ target: calibrationSettings.siteId, set: { measurementRelSd: row.measurementRelSd, updatedAt: row.updatedAt } })
    .execute();
