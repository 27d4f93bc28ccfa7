import { eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { vessels } from '../../db/schema';

export const listSiteVessels = (db: Db, siteId: number) =>
  db.select().from(vessels).where(eq(vessels.siteId, siteId)).orderBy(vessels.name).all();
