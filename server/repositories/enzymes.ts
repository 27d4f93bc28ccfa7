import { eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { enzymes } from '../../db/schema';

export const listSiteEnzymes = (db: Db, siteId: number) =>
  db.select().from(enzymes).where(eq(enzymes.siteId, siteId)).orderBy(enzymes.name).all();
