import { and, eq, sql } from 'drizzle-orm';
import { preparedPer, first, returned, type Db } from '../../db/client';
import { batches, vessels } from '../../db/tables';
import type { VesselInput } from '../../src/contracts/vessels';

export type VesselRow = typeof vessels.$inferSelect;

const vesselsOfSite = preparedPer((db, _v, name) =>
  db
    .select()
    .from(vessels)
    .where(eq(vessels.siteId, sql.placeholder('siteId')))
    .orderBy(vessels.name)
    .prepare(name),
);
export const listSiteVessels = (db: Db, siteId: number) => vesselsOfSite(db).execute({ siteId });

export const findSiteVessel = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(vessels)
    .where(and(eq(vessels.siteId, siteId), eq(vessels.id, id)))
    .then(first);

export const findSiteVesselByName = (db: Db, siteId: number, name: string) =>
  db
    .select()
    .from(vessels)
    .where(and(eq(vessels.siteId, siteId), eq(vessels.name, name)))
    .then(first);

export const insertVessel = (db: Db, siteId: number, v: VesselInput) =>
  db
    .insert(vessels)
    .values({ ...v, siteId })
    .returning()
    .then(returned);

export const updateVessel = (db: Db, id: number, v: VesselInput) => db.update(vessels).set(v).where(eq(vessels.id, id)).returning().then(returned);

/** Each vessel of the site with its running batch's start and program, if one runs. */
export const vesselsWithRunningBatch = (db: Db, siteId: number) =>
  db
    .select({ vessel: vessels, startedAt: batches.startedAt, program: batches.program })
    .from(vessels)
    .leftJoin(batches, and(eq(batches.vesselId, vessels.id), eq(batches.state, 'running')))
    .where(eq(vessels.siteId, siteId))
    .execute();
