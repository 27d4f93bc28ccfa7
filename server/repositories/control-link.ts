import { and, asc, desc, eq } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { batches, batchReadings, linkGaps, linkSettings, sites, vessels, vesselSources } from '../../db/tables';

export type VesselSourceRow = typeof vesselSources.$inferSelect;

export const listSiteIds = async (db: Db) => (await db.select({ id: sites.id }).from(sites).orderBy(sites.id).execute()).map((r) => r.id);

export const listSiteSources = (db: Db, siteId: number) =>
  db
    .select({ source: vesselSources, vesselName: vessels.name })
    .from(vesselSources)
    .innerJoin(vessels, eq(vesselSources.vesselId, vessels.id))
    .where(eq(vesselSources.siteId, siteId))
    .orderBy(vessels.name)
    .execute();

export const findVesselSource = (db: Db, siteId: number, vesselId: number) =>
  db
    .select()
    .from(vesselSources)
    .where(and(eq(vesselSources.siteId, siteId), eq(vesselSources.vesselId, vesselId)))
    .then(first);

export const upsertVesselSource = (db: Db, row: Omit<typeof vesselSources.$inferInsert, 'id' | 'createdAt'>) =>
  db
    .insert(vesselSources)
    .values(row)
    .onConflictDoUpdate({ target: vesselSources.vesselId, set: { ...row } })
    .returning()
    .then(returned);

export const updateVesselSource = (db: Db, id: number, patch: Partial<Pick<VesselSourceRow, 'trustedThumbprint' | 'trustedAt' | 'trustedBy' | 'updatedAt'>>) =>
  db.update(vesselSources).set(patch).where(eq(vesselSources.id, id)).returning().then(returned);

export const deleteVesselSource = (db: Db, id: number) => db.delete(vesselSources).where(eq(vesselSources.id, id)).execute();

/** Enabled sources of the site whose vessel runs a batch, with that batch. */
export const sourcesOfRunningBatches = (db: Db, siteId: number) =>
  db
    .select({ source: vesselSources, vesselName: vessels.name, batchId: batches.id, startedAt: batches.startedAt })
    .from(vesselSources)
    .innerJoin(vessels, eq(vesselSources.vesselId, vessels.id))
    .innerJoin(batches, and(eq(batches.vesselId, vesselSources.vesselId), eq(batches.state, 'running')))
    .where(and(eq(vesselSources.siteId, siteId), eq(vesselSources.isEnabled, true)))
    .execute();

/** Source time of the batch's latest control-system reading. */
export const lastControlReadingAt = async (db: Db, batchId: number) =>
  (
    await db
      .select({ takenAt: batchReadings.takenAt })
      .from(batchReadings)
      .where(and(eq(batchReadings.batchId, batchId), eq(batchReadings.source, 'control_system')))
      .orderBy(desc(batchReadings.takenAt))
      .limit(1)
      .then(first)
  )?.takenAt ?? null;

export const findLinkSettings = (db: Db, siteId: number) => db.select().from(linkSettings).where(eq(linkSettings.siteId, siteId)).then(first);

export const upsertLinkSettings = (db: Db, row: typeof linkSettings.$inferInsert) =>
  db
    .insert(linkSettings)
    .values(row)
    .onConflictDoUpdate({
      target: linkSettings.siteId,
      set: { samplingIntervalMs: row.samplingIntervalMs, deadbandC: row.deadbandC, updatedAt: row.updatedAt },
    })
    .execute();

export const insertLinkGap = (db: Db, row: Omit<typeof linkGaps.$inferInsert, 'id' | 'createdAt'>) =>
  db.insert(linkGaps).values(row).returning().then(returned);

export const listBatchGaps = (db: Db, siteId: number, batchId: number) =>
  db
    .select()
    .from(linkGaps)
    .where(and(eq(linkGaps.siteId, siteId), eq(linkGaps.batchId, batchId)))
    .orderBy(asc(linkGaps.fromAt))
    .execute();
