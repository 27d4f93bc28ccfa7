import { and, eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { vessels } from '../../db/schema';
import type { VesselInput } from '../../src/contracts/vessels';

export type VesselRow = typeof vessels.$inferSelect;

export const listSiteVessels = (db: Db, siteId: number) =>
  db.select().from(vessels).where(eq(vessels.siteId, siteId)).orderBy(vessels.name).all();

export const findSiteVessel = (db: Db, siteId: number, id: number) =>
  db.select().from(vessels).where(and(eq(vessels.siteId, siteId), eq(vessels.id, id))).get();

export const findSiteVesselByName = (db: Db, siteId: number, name: string) =>
  db.select().from(vessels).where(and(eq(vessels.siteId, siteId), eq(vessels.name, name))).get();

export const insertVessel = (db: Db, siteId: number, v: VesselInput) => db.insert(vessels).values({ ...v, siteId }).returning().get();

export const updateVessel = (db: Db, id: number, v: VesselInput) => db.update(vessels).set(v).where(eq(vessels.id, id)).returning().get();
