import { and, asc, desc, eq, getTableColumns, gt, inArray, lt, lte, ne, or, sql } from 'drizzle-orm';
import { boundRow, columnPlaceholders, preparedPer, first, returned, type Db } from '../../db/client';
import { alias } from 'drizzle-orm/pg-core';
import { batchReadings, batches, batchSettings, changeRequests, deviations, lots, recipes, signatures, users, vessels, databaseDialect } from '../../db/tables';

export type BatchRow = typeof batches.$inferSelect;
export type ReadingRow = typeof batchReadings.$inferSelect;
export type DeviationRow = typeof deviations.$inferSelect;

const starter = alias(users, 'starter');
const closer = alias(users, 'closer');

const joinedBatches = (db: Db) =>
  db
    .select({ batch: batches, recipeName: recipes.name, vesselName: vessels.name, lotCode: lots.lotCode, startedBy: starter.name, closedBy: closer.name })
    .from(batches)
    .innerJoin(recipes, eq(batches.recipeId, recipes.id))
    .innerJoin(vessels, eq(batches.vesselId, vessels.id))
    .innerJoin(lots, eq(batches.lotId, lots.id))
    .innerJoin(starter, eq(batches.startedBy, starter.id))
    .leftJoin(closer, eq(batches.closedBy, closer.id));

export type BatchJoined = NonNullable<Awaited<ReturnType<typeof findSiteBatch>>>;

// Prepared (per connection or transaction handle) where a reading's path runs them: see preparedPer.
const siteBatch = preparedPer((db, _v, name) =>
  joinedBatches(db)
    .where(and(eq(batches.siteId, sql.placeholder('siteId')), eq(batches.id, sql.placeholder('id'))))
    .prepare(name),
);
export const findSiteBatch = (db: Db, siteId: number, id: number) => siteBatch(db).execute({ siteId, id }).then(first);

export const listSiteBatches = (db: Db, siteId: number) => joinedBatches(db).where(eq(batches.siteId, siteId)).orderBy(desc(batches.id)).limit(500).execute();

export const runningBatchOnVessel = (db: Db, siteId: number, vesselId: number) =>
  db
    .select({ id: batches.id })
    .from(batches)
    .where(and(eq(batches.siteId, siteId), eq(batches.vesselId, vesselId), eq(batches.state, 'running')))
    .then(first);

export const insertBatch = (db: Db, row: Omit<typeof batches.$inferInsert, 'id' | 'createdAt'>) => db.insert(batches).values(row).returning().then(returned);

export const updateBatch = (
  db: Db,
  id: number,
  patch: Partial<Pick<BatchRow, 'state' | 'closedAt' | 'closedBy' | 'closeComment' | 'measuredProductGPerL' | 'forecastAtCloseGPerL'>>,
) => db.update(batches).set(patch).where(eq(batches.id, id)).returning().then(returned);

/** Batch ids among `ids` where the user logged a reading. */
export const batchesLoggedBy = async (db: Db, userId: number, ids: number[]) =>
  ids.length
    ? (
        await db
          .selectDistinct({ batchId: batchReadings.batchId })
          .from(batchReadings)
          .where(and(eq(batchReadings.enteredBy, userId), inArray(batchReadings.batchId, ids)))
          .execute()
      ).map((r) => r.batchId)
    : [];

// Readings: the batch's own, in time order (ties by arrival).
export const listReadings = (db: Db, batchId: number) =>
  db
    .select({ reading: batchReadings, enteredBy: users.name })
    .from(batchReadings)
    .innerJoin(users, eq(batchReadings.enteredBy, users.id))
    .where(eq(batchReadings.batchId, batchId))
    .orderBy(asc(batchReadings.takenAt), asc(batchReadings.id))
    .execute();

const pointsOfBatch = preparedPer((db, _v, name) =>
  db
    .select({ takenAt: batchReadings.takenAt, c: batchReadings.c })
    .from(batchReadings)
    .where(eq(batchReadings.batchId, sql.placeholder('batchId')))
    .orderBy(asc(batchReadings.takenAt), asc(batchReadings.id))
    .prepare(name),
);
export const readingPoints = (db: Db, batchId: number) => pointsOfBatch(db).execute({ batchId });

// The same in columns, rows as arrays (no per-row objects): the cache of long records reads these, all of a
// batch's or those added after a given reading.
const pointColumns = preparedPer((db, afterOnly: boolean, name: string) =>
  db
    .select({ id: batchReadings.id, takenAt: batchReadings.takenAt, c: batchReadings.c })
    .from(batchReadings)
    .where(
      afterOnly
        ? and(eq(batchReadings.batchId, sql.placeholder('batchId')), gt(batchReadings.id, sql.placeholder('afterId')))
        : eq(batchReadings.batchId, sql.placeholder('batchId')),
    )
    .orderBy(asc(batchReadings.takenAt), asc(batchReadings.id))
    .prepare(name),
);
export type PointRow = [id: number, takenAt: string, c: number];
const asPointRows = (rows: { id: number; takenAt: string; c: number }[]): PointRow[] => rows.map((r) => [r.id, r.takenAt, r.c]);
export const readingPointRows = async (db: Db, batchId: number) => asPointRows(await pointColumns(db, false).execute({ batchId }));
/** The readings added after the one with id `afterId`, as readingPointRows. */
export const readingPointRowsAfter = async (db: Db, batchId: number, afterId: number) =>
  asPointRows(await pointColumns(db, true).execute({ batchId, afterId }));

// Readings are only ever added, and ids only grow: the newest id is the version of a batch's record.
const newestReading = preparedPer((db, _v, name) =>
  db
    .select({ id: sql<number | null>`max(${batchReadings.id})`.mapWith(Number) })
    .from(batchReadings)
    .where(eq(batchReadings.batchId, sql.placeholder('batchId')))
    .prepare(name),
);
export const newestReadingId = async (db: Db, batchId: number): Promise<number> => (await newestReading(db).execute({ batchId }))[0]?.id ?? 0;

const newestAndCount = preparedPer((db, _v, name) =>
  db
    .select({ id: sql<number | null>`max(${batchReadings.id})`.mapWith(Number), n: sql<number>`count(*)`.mapWith(Number) })
    .from(batchReadings)
    .where(eq(batchReadings.batchId, sql.placeholder('batchId')))
    .prepare(name),
);
/**
 * What a batch's kept record is checked against: its newest reading id, and on PostgreSQL also how many readings
 * it has. There ids are handed out before the commit, so a reading with a lower id can become visible after one
 * with a higher id (two writers); SQLite's one writer commits them in id order, and the count is not read.
 */
export async function readingVersion(db: Db, batchId: number): Promise<{ newest: number; count: number | null }> {
  if (databaseDialect === 'sqlite') return { newest: await newestReadingId(db, batchId), count: null };
  const row = (await newestAndCount(db).execute({ batchId }))[0];
  return { newest: row?.id ?? 0, count: row?.n ?? 0 };
}

/** Whole readings with who entered them, for the given ids, in time order. */
export const readingsByIds = (db: Db, ids: readonly number[]) =>
  ids.length
    ? db
        .select({ reading: batchReadings, enteredBy: users.name })
        .from(batchReadings)
        .innerJoin(users, eq(batchReadings.enteredBy, users.id))
        .where(inArray(batchReadings.id, [...ids]))
        .orderBy(asc(batchReadings.takenAt), asc(batchReadings.id))
        .execute()
    : [];

type Cursor = { takenAt: string; id: number };

/** Whole readings past `cursor` in time order ('asc', the report) or newest first ('desc', the table), `limit` at a time. */
function readingsPast(db: Db, batchId: number, limit: number, cursor: Cursor | null, order: 'asc' | 'desc') {
  const past = order === 'asc' ? gt : lt;
  const by = order === 'asc' ? asc : desc;
  return db
    .select({ reading: batchReadings, enteredBy: users.name })
    .from(batchReadings)
    .innerJoin(users, eq(batchReadings.enteredBy, users.id))
    .where(
      and(
        eq(batchReadings.batchId, batchId),
        cursor ? or(past(batchReadings.takenAt, cursor.takenAt), and(eq(batchReadings.takenAt, cursor.takenAt), past(batchReadings.id, cursor.id))) : undefined,
      ),
    )
    .orderBy(by(batchReadings.takenAt), by(batchReadings.id))
    .limit(limit)
    .execute();
}

/** Readings in time order after `after` (the last of the previous page), `limit` at a time: the report. */
export const readingsAfter = (db: Db, batchId: number, limit: number, after: Cursor | null) => readingsPast(db, batchId, limit, after, 'asc');

/** A page of a batch's readings, newest first, older than the reading `beforeId` when given; null for no such reading. */
export async function readingsPage(db: Db, batchId: number, limit: number, beforeId: number | null) {
  if (beforeId === null) return readingsPast(db, batchId, limit, null, 'desc');
  const before = await db
    .select({ takenAt: batchReadings.takenAt })
    .from(batchReadings)
    .where(and(eq(batchReadings.batchId, batchId), eq(batchReadings.id, beforeId)))
    .then(first);
  return before ? await readingsPast(db, batchId, limit, { takenAt: before.takenAt, id: beforeId }, 'desc') : null;
}

// Times are stored as toISOString() text, so text order is time order; among equal times the later id is later.
const readingBefore = preparedPer((db, _v, name) =>
  db
    .select({ takenAt: batchReadings.takenAt, c: batchReadings.c })
    .from(batchReadings)
    .where(and(eq(batchReadings.batchId, sql.placeholder('batchId')), lte(batchReadings.takenAt, sql.placeholder('takenAt'))))
    .orderBy(desc(batchReadings.takenAt), desc(batchReadings.id))
    .limit(1)
    .prepare(name),
);
/** The latest stored reading taken at or before `takenAt`, as the deviation rules see "the reading before". */
export const readingAtOrBefore = (db: Db, batchId: number, takenAt: string) => readingBefore(db).execute({ batchId, takenAt }).then(first);

// Lists bound as parameters go in parts: SQLite binds at most 32,766 parameters a statement, PostgreSQL 65,535.
const PART = 1_000;
const partsOf = <T>(items: readonly T[]): T[][] => Array.from({ length: Math.ceil(items.length / PART) }, (_, i) => items.slice(i * PART, (i + 1) * PART));

/**
 * readingAtOrBefore for each of `times` (in their order; undefined where none). PostgreSQL answers all of them in
 * one statement (a lateral join over the times, each an index lookup); SQLite, in-process, one prepared lookup each.
 */
export async function readingsAtOrBefore(db: Db, batchId: number, times: readonly string[]): Promise<({ takenAt: string; c: number } | undefined)[]> {
  if (databaseDialect === 'sqlite') {
    const out: ({ takenAt: string; c: number } | undefined)[] = [];
    for (const takenAt of times) out.push(await readingAtOrBefore(db, batchId, takenAt));
    return out;
  }
  const out: ({ takenAt: string; c: number } | undefined)[] = [];
  for (const part of partsOf(times)) {
    const { rows } = await db.execute<{ i: string; taken_at: string | null; c: number | null }>(sql`
      select t.i, r.taken_at, r.c from unnest(${sql.param(part)}::text[]) with ordinality as t(at, i)
      left join lateral (
        select ${batchReadings.takenAt}, ${batchReadings.c} from ${batchReadings}
        where ${batchReadings.batchId} = ${batchId} and ${batchReadings.takenAt} <= t.at
        order by ${batchReadings.takenAt} desc, ${batchReadings.id} desc limit 1
      ) r on true
      order by t.i`);
    for (const r of rows) out.push(r.taken_at === null ? undefined : { takenAt: r.taken_at, c: Number(r.c) });
  }
  return out;
}

// A reading row's columns under their property names, from the lateral subquery `r`; and such a raw row mapped
// as Drizzle maps its own (bigint ids to numbers).
const readingColumns = Object.entries(getTableColumns(batchReadings));
const readingColumnsOfR = sql.join(
  readingColumns.map(([key, column]) => sql`r.${sql.identifier(column.name)} as ${sql.identifier(key)}`),
  sql`, `,
);
const readingRowOf = (raw: Record<string, unknown>) =>
  Object.fromEntries(readingColumns.map(([key, column]) => [key, raw[key] === null ? null : column.mapFromDriverValue(raw[key])])) as ReadingRow;

/**
 * The readings of a batch with any of these keys. On PostgreSQL each key is its own lookup of the unique key
 * (a lateral join, kept a loop by its LIMIT): as `client_key in (...)` or a plain join, the planner read every
 * reading of the batch whenever its statistics were behind a fast-growing batch (2-4 ms a flush under load).
 */
export async function readingsWithKeys(db: Db, batchId: number, keys: readonly string[]): Promise<ReadingRow[]> {
  const out: ReadingRow[] = [];
  for (const part of partsOf(keys)) {
    if (databaseDialect === 'sqlite')
      out.push(
        ...(await db
          .select()
          .from(batchReadings)
          .where(and(eq(batchReadings.batchId, batchId), inArray(batchReadings.clientKey, part)))),
      );
    else
      out.push(
        ...(
          await db.execute<Record<string, unknown>>(sql`
            select ${readingColumnsOfR} from unnest(${sql.param(part)}::text[]) as k(key)
            join lateral (select * from ${batchReadings} where ${batchReadings.batchId} = ${batchId} and ${batchReadings.clientKey} = k.key limit 1) r on true`)
        ).rows.map(readingRowOf),
      );
  }
  return out;
}

export const lastReadingTimes = (db: Db, batchIds: number[]) =>
  batchIds.length
    ? db
        .select({ batchId: batchReadings.batchId, last: sql<string>`max(${batchReadings.takenAt})` })
        .from(batchReadings)
        .where(inArray(batchReadings.batchId, batchIds))
        .groupBy(batchReadings.batchId)
        .execute()
    : [];

const readingByKey = preparedPer((db, _v, name) =>
  db
    .select()
    .from(batchReadings)
    .where(and(eq(batchReadings.batchId, sql.placeholder('batchId')), eq(batchReadings.clientKey, sql.placeholder('key'))))
    .prepare(name),
);
export const findReadingByKey = (db: Db, batchId: number, key: string) => readingByKey(db).execute({ batchId, key }).then(first);

const readingJoined = preparedPer((db, _v, name) =>
  db
    .select({ reading: batchReadings, enteredBy: users.name })
    .from(batchReadings)
    .innerJoin(users, eq(batchReadings.enteredBy, users.id))
    .where(eq(batchReadings.id, sql.placeholder('id')))
    .prepare(name),
);
export const findReadingJoined = (db: Db, id: number) => readingJoined(db).execute({ id }).then(first);

// A batch's keys from `prefix` on, in key order, a page at a time (the unique key index answers it alone).
const keysFrom = preparedPer((db, _v, name) =>
  db
    .select({ k: batchReadings.clientKey })
    .from(batchReadings)
    .where(and(eq(batchReadings.batchId, sql.placeholder('batchId')), gt(batchReadings.clientKey, sql.placeholder('after'))))
    .orderBy(asc(batchReadings.clientKey))
    .limit(sql.placeholder('limit'))
    .prepare(name),
);
/** Up to `limit` of the batch's reading keys after the key `after`, in key order. */
export const readingKeysAfter = async (db: Db, batchId: number, after: string, limit: number): Promise<string[]> =>
  (await keysFrom(db).execute({ batchId, after, limit })).map((r) => r.k);

type NewReading = Omit<typeof batchReadings.$inferInsert, 'id'>;
const READING_COLUMNS = ['siteId', 'batchId', 'clientKey', 'takenAt', 'c', 'note', 'source', 'enteredBy', 'receivedAt'] as const;
const insertReadingRow = preparedPer((db, _v, name) =>
  db
    .insert(batchReadings)
    .values(columnPlaceholders(READING_COLUMNS) as unknown as NewReading)
    .returning()
    .prepare(name),
);
export const insertReading = async (db: Db, row: NewReading): Promise<ReadingRow> =>
  insertReadingRow(db).execute(boundRow(READING_COLUMNS, row)).then(returned);

const insertReadingId = preparedPer((db, _v, name) =>
  db
    .insert(batchReadings)
    .values(columnPlaceholders(READING_COLUMNS) as unknown as NewReading)
    .returning({ id: batchReadings.id })
    .prepare(name),
);
/**
 * Many readings; their new ids in order. SQLite: one prepared statement (no SQL built per row, no round trip);
 * PostgreSQL: one multi-row insert per part (a round trip per row was the cost).
 */
export async function insertReadings(db: Db, rows: readonly NewReading[]): Promise<number[]> {
  if (databaseDialect === 'postgres') return (await insertReadingRows(db, rows)).map((r) => r.id);
  const insert = insertReadingId(db);
  const ids: number[] = [];
  for (const row of rows) ids.push((await insert.execute(boundRow(READING_COLUMNS, row)))[0]!.id);
  return ids;
}

/** Many readings, as insertReadings, with their stored rows in order. */
export async function insertReadingRows(db: Db, rows: readonly NewReading[]): Promise<ReadingRow[]> {
  if (databaseDialect === 'sqlite') {
    const out: ReadingRow[] = [];
    for (const row of rows) out.push(await insertReading(db, row));
    return out;
  }
  const out: ReadingRow[] = [];
  for (const part of partsOf(rows)) {
    // RETURNING's order is not promised; a batch's key is unique, so each row is found by it.
    const stored = new Map((await db.insert(batchReadings).values(part).returning()).map((r) => [`${r.batchId} ${r.clientKey}`, r]));
    for (const row of part) out.push(stored.get(`${row.batchId} ${row.clientKey}`)!);
  }
  return out;
}

// Deviations, with the names of who acknowledged and closed them.
const acker = alias(users, 'acker');
const devCloser = alias(users, 'dev_closer');
const joinedDeviations = (db: Db) =>
  db
    .select({ deviation: deviations, acknowledgedBy: acker.name, closedBy: devCloser.name })
    .from(deviations)
    .leftJoin(acker, eq(deviations.acknowledgedBy, acker.id))
    .leftJoin(devCloser, eq(deviations.closedBy, devCloser.id));
export type DeviationJoined = NonNullable<Awaited<ReturnType<typeof findSiteDeviation>>>;

export const listDeviations = (db: Db, batchId: number) =>
  joinedDeviations(db).where(eq(deviations.batchId, batchId)).orderBy(asc(deviations.at), asc(deviations.id)).execute();

export const findSiteDeviation = (db: Db, siteId: number, id: number) =>
  joinedDeviations(db)
    .where(and(eq(deviations.siteId, siteId), eq(deviations.id, id)))
    .then(first);

const readingDeviations = preparedPer((db, _v, name) =>
  joinedDeviations(db)
    .where(eq(deviations.readingId, sql.placeholder('readingId')))
    .orderBy(asc(deviations.id))
    .prepare(name),
);
export const deviationsOfReading = (db: Db, readingId: number) => readingDeviations(db).execute({ readingId });

const activeDeviation = preparedPer((db, _v, name) =>
  db
    .select({ id: deviations.id })
    .from(deviations)
    .where(and(eq(deviations.batchId, sql.placeholder('batchId')), eq(deviations.kind, sql.placeholder('kind')), ne(deviations.state, 'closed')))
    .prepare(name),
);
export const hasActiveDeviation = async (db: Db, batchId: number, kind: DeviationRow['kind']) =>
  !!(await activeDeviation(db).execute({ batchId, kind }).then(first));

export const countActiveDeviations = (db: Db, batchIds: number[]) =>
  batchIds.length
    ? db
        .select({ batchId: deviations.batchId, n: sql<number>`count(*)`.mapWith(Number) })
        .from(deviations)
        .where(and(inArray(deviations.batchId, batchIds), ne(deviations.state, 'closed')))
        .groupBy(deviations.batchId)
        .execute()
    : [];

export const insertDeviation = (db: Db, row: Omit<typeof deviations.$inferInsert, 'id'>) => db.insert(deviations).values(row).returning().then(returned);

export const updateDeviation = (
  db: Db,
  id: number,
  patch: Partial<Pick<DeviationRow, 'state' | 'acknowledgedBy' | 'acknowledgedAt' | 'acknowledgeComment' | 'closedBy' | 'closedAt' | 'closeComment'>>,
) => db.update(deviations).set(patch).where(eq(deviations.id, id)).execute();

// Settings
const settingsOfSite = preparedPer((db, _v, name) =>
  db
    .select()
    .from(batchSettings)
    .where(eq(batchSettings.siteId, sql.placeholder('siteId')))
    .prepare(name),
);
export const findBatchSettings = (db: Db, siteId: number) => settingsOfSite(db).execute({ siteId }).then(first);

export const upsertBatchSettings = (db: Db, row: typeof batchSettings.$inferInsert) =>
  db
    .insert(batchSettings)
    .values(row)
    .onConflictDoUpdate({ target: batchSettings.siteId, set: { toleranceC: row.toleranceC, gapLimitMin: row.gapLimitMin, updatedAt: row.updatedAt } })
    .execute();

// Change control's signatures on the plan a batch runs: the batch record shows who released it.
export const planSignatures = (db: Db, siteId: number, planId: number) =>
  db
    .select({ signature: signatures, changeRequestId: changeRequests.id, status: changeRequests.status })
    .from(signatures)
    .innerJoin(changeRequests, eq(signatures.changeRequestId, changeRequests.id))
    .where(and(eq(changeRequests.siteId, siteId), eq(changeRequests.planId, planId)))
    .orderBy(asc(signatures.id))
    .execute();
