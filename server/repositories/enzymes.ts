import { and, asc, desc, eq, or, sql, type SQL, type SQLWrapper } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { enzymes } from '../../db/schema';
import type { EnzymeInput, EnzymeQuery, EnzymeUpdate } from '../../src/contracts/enzymes';

export type EnzymeRow = typeof enzymes.$inferSelect;

export const listSiteEnzymes = (db: Db, siteId: number) =>
  db.select().from(enzymes).where(eq(enzymes.siteId, siteId)).orderBy(enzymes.name).all();

// LIKE treats % and _ as wildcards: a search for "10%" must match the text, not everything.
const likeText = (q: string) => `%${q.replace(/[\\%_]/g, (ch) => `\\${ch}`)}%`;

/** One page of a site's enzymes matching a free-text search, and how many match in all. */
export function querySiteEnzymes(db: Db, siteId: number, q: EnzymeQuery): { rows: EnzymeRow[]; total: number } {
  const conditions: SQL[] = [eq(enzymes.siteId, siteId)];
  if (q.q) {
    const pattern = likeText(q.q);
    const esc = (col: SQLWrapper) => sql`${col} like ${pattern} escape '\\'`;
    conditions.push(or(esc(enzymes.name), esc(enzymes.enzymeClass), esc(enzymes.ecNumber), esc(enzymes.supplier))!);
  }
  const where = and(...conditions);
  const order = q.dir === 'desc' ? desc(enzymes[q.sort]) : asc(enzymes[q.sort]);
  const rows = db
    .select()
    .from(enzymes)
    .where(where)
    .orderBy(order, asc(enzymes.id))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .all();
  const total = db.select({ n: sql<number>`count(*)` }).from(enzymes).where(where).get()?.n ?? 0;
  return { rows, total };
}

export const findSiteEnzyme = (db: Db, siteId: number, id: number) =>
  db.select().from(enzymes).where(and(eq(enzymes.siteId, siteId), eq(enzymes.id, id))).get();

export const findSiteEnzymeByName = (db: Db, siteId: number, name: string) =>
  db.select().from(enzymes).where(and(eq(enzymes.siteId, siteId), sql`lower(${enzymes.name}) = lower(${name})`)).get();

export const insertEnzyme = (db: Db, siteId: number, e: EnzymeInput) => db.insert(enzymes).values({ ...e, siteId }).returning().get();

export const updateEnzyme = (db: Db, id: number, patch: EnzymeUpdate) => db.update(enzymes).set(patch).where(eq(enzymes.id, id)).returning().get();

