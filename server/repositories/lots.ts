import { desc, eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { enzymes, lots } from '../../db/schema';

export const listSiteLots = (db: Db, siteId: number) =>
  db
    .select({ lot: lots, enzymeName: enzymes.name })
    .from(lots)
    .innerJoin(enzymes, eq(lots.enzymeId, enzymes.id))
    .where(eq(lots.siteId, siteId))
    .orderBy(desc(lots.receivedOn), lots.lotCode)
    .all();
