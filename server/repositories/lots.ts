import { and, desc, eq, sql } from 'drizzle-orm';
import { preparedPer, first, returned, type Db } from '../../db/client';
import { enzymes, lots, users } from '../../db/tables';
import type { LotQuery, LotStatus } from '../../src/contracts/lots';

export type LotRow = typeof lots.$inferSelect;
export type NewLotRow = Omit<typeof lots.$inferInsert, 'id' | 'createdAt'>;

// One prepared query for each combination of the optional filters.
const siteLots = preparedPer((db, filter: { byStatus: boolean; byEnzyme: boolean }, name: string) =>
  db
    .select({ lot: lots, enzymeName: enzymes.name, activityUnit: enzymes.activityUnit })
    .from(lots)
    .innerJoin(enzymes, eq(lots.enzymeId, enzymes.id))
    .where(
      and(
        eq(lots.siteId, sql.placeholder('siteId')),
        filter.byStatus ? eq(lots.status, sql.placeholder('status')) : undefined,
        filter.byEnzyme ? eq(lots.enzymeId, sql.placeholder('enzymeId')) : undefined,
      ),
    )
    .orderBy(desc(lots.receivedOn), lots.lotCode)
    .prepare(name),
);

export const listSiteLots = (db: Db, siteId: number, q: LotQuery = {}) =>
  siteLots(db, { byStatus: !!q.status, byEnzyme: !!q.enzymeId }).execute({ siteId, status: q.status, enzymeId: q.enzymeId });

export const findSiteLot = (db: Db, siteId: number, id: number) =>
  db
    .select({ lot: lots, enzymeName: enzymes.name, activityUnit: enzymes.activityUnit, decidedBy: users.name })
    .from(lots)
    .innerJoin(enzymes, eq(lots.enzymeId, enzymes.id))
    .leftJoin(users, eq(lots.decidedBy, users.id))
    .where(and(eq(lots.siteId, siteId), eq(lots.id, id)))
    .then(first);

export const findLotByCode = (db: Db, enzymeId: number, lotCode: string) =>
  db
    .select()
    .from(lots)
    .where(and(eq(lots.enzymeId, enzymeId), eq(lots.lotCode, lotCode)))
    .then(first);

export const insertLot = (db: Db, row: NewLotRow) => db.insert(lots).values(row).returning().then(returned);

export const setLotDecision = (db: Db, id: number, d: { status: LotStatus; decisionReason: string; decidedBy: number; decidedAt: string }) =>
  db.update(lots).set(d).where(eq(lots.id, id)).returning().then(returned);
