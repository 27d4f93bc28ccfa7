import { and, asc, desc, eq, or, sql, type SQL, type SQLWrapper } from 'drizzle-orm';
import { preparedPer, first, returned, type Db } from '../../db/client';
import { enzymes } from '../../db/tables';
import type { EnzymeInput, EnzymeQuery, EnzymeUpdate } from '../../src/contracts/enzymes';

export type EnzymeRow = typeof enzymes.$inferSelect;

// LIKE treats % and _ as wildcards: a search for "10%" must match the text, not everything.
const likeText = (q: string) => `%${q.replace(/[\\%_]/g, (ch) => `\\${ch}`)}%`;

function enzymeFilter(search: boolean): SQL | undefined {
  const siteIs = eq(enzymes.siteId, sql.placeholder('siteId'));
  if (!search) return siteIs;
  const pattern = sql.placeholder('pattern');
  // lower() on both sides: SQLite's LIKE ignores ASCII case, PostgreSQL's does not.
  const esc = (col: SQLWrapper) => sql`lower(${col}) like lower(${pattern}) escape '\\'`;
  return and(siteIs, or(esc(enzymes.name), esc(enzymes.enzymeClass), esc(enzymes.ecNumber), esc(enzymes.supplier)));
}

// Prepared once per search/sort/direction combination (a handful), so a page read does not rebuild its SQL.
const enzymePage = preparedPer((db, v: { search: boolean; sort: EnzymeQuery['sort']; dir: EnzymeQuery['dir'] }, name: string) => ({
  page: db
    .select()
    .from(enzymes)
    .where(enzymeFilter(v.search))
    .orderBy(v.dir === 'desc' ? desc(enzymes[v.sort]) : asc(enzymes[v.sort]), asc(enzymes.id))
    .limit(sql.placeholder('limit'))
    .offset(sql.placeholder('offset'))
    .prepare(`${name}_page`),
  total: db
    .select({ n: sql<number>`count(*)`.mapWith(Number) })
    .from(enzymes)
    .where(enzymeFilter(v.search))
    .prepare(`${name}_total`),
}));

/** One page of a site's enzymes matching a free-text search, and how many match in all. */
export async function querySiteEnzymes(db: Db, siteId: number, q: EnzymeQuery): Promise<{ rows: EnzymeRow[]; total: number }> {
  const { page, total } = enzymePage(db, { search: !!q.q, sort: q.sort, dir: q.dir });
  const args = { siteId, pattern: q.q ? likeText(q.q) : undefined, limit: q.pageSize, offset: (q.page - 1) * q.pageSize };
  const rows = await page.execute(args);
  // A first page that is not full holds every match: no count needed.
  if (args.offset === 0 && rows.length < args.limit) return { rows, total: rows.length };
  return { rows, total: (await total.execute(args))[0]?.n ?? 0 };
}

export const findSiteEnzyme = (db: Db, siteId: number, id: number) =>
  db
    .select()
    .from(enzymes)
    .where(and(eq(enzymes.siteId, siteId), eq(enzymes.id, id)))
    .then(first);

export const findSiteEnzymeByName = (db: Db, siteId: number, name: string) =>
  db
    .select()
    .from(enzymes)
    .where(and(eq(enzymes.siteId, siteId), sql`lower(${enzymes.name}) = lower(${name})`))
    .then(first);

export const insertEnzyme = (db: Db, siteId: number, e: EnzymeInput) =>
  db
    .insert(enzymes)
    .values({ ...e, siteId })
    .returning()
    .then(returned);

export const updateEnzyme = (db: Db, id: number, patch: EnzymeUpdate) => db.update(enzymes).set(patch).where(eq(enzymes.id, id)).returning().then(returned);
