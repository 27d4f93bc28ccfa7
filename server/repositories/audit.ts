import { and, asc, desc, eq, gt, gte, inArray, isNull, lt, lte, sql, type SQL } from 'drizzle-orm';
import { boundRow, columnPlaceholders, preparedPer, first, returned, type Db } from '../../db/client';
import { auditEvents, databaseDialect } from '../../db/tables';

export type AuditRow = typeof auditEvents.$inferSelect;

const sameSite = (siteId: number | null) => (siteId === null ? isNull(auditEvents.siteId) : eq(auditEvents.siteId, siteId));

// On every write path, so prepared (per connection or transaction handle).
const lastHashOfSite = preparedPer((db, _v, name) =>
  db
    .select({ hash: auditEvents.hash })
    .from(auditEvents)
    .where(eq(auditEvents.siteId, sql.placeholder('siteId')))
    .orderBy(desc(auditEvents.id))
    .limit(1)
    .prepare(name),
);
const lastHashOfNoSite = preparedPer((db, _v, name) =>
  db.select({ hash: auditEvents.hash }).from(auditEvents).where(isNull(auditEvents.siteId)).orderBy(desc(auditEvents.id)).limit(1).prepare(name),
);

export const lastAuditHash = (db: Db, siteId: number | null) =>
  (siteId === null ? lastHashOfNoSite(db).execute() : lastHashOfSite(db).execute({ siteId })).then((rows) => rows[0]?.hash);

type NewAuditRow = typeof auditEvents.$inferInsert;
const AUDIT_COLUMNS = ['siteId', 'userId', 'actor', 'action', 'entity', 'entityId', 'oldValue', 'newValue', 'at', 'prevHash', 'hash'] as const;
// A placeholder in a JSON column would store null as the text 'null', so a null value is written as SQL NULL
// instead: one prepared insert for each combination of null old and new values.
const insertAuditRow = preparedPer((db, nulls: { old: boolean; new: boolean }, name: string) =>
  db
    .insert(auditEvents)
    .values({
      ...(columnPlaceholders(AUDIT_COLUMNS) as unknown as NewAuditRow),
      oldValue: nulls.old ? sql`null` : sql.placeholder('oldValue'),
      newValue: nulls.new ? sql`null` : sql.placeholder('newValue'),
    })
    .returning()
    .prepare(name),
);

export const insertAudit = async (db: Db, row: NewAuditRow): Promise<AuditRow> =>
  insertAuditRow(db, { old: row.oldValue == null, new: row.newValue == null })
    .execute(boundRow(AUDIT_COLUMNS, row))
    .then(returned);

/**
 * Many events, in their order (a chain's order is its ids' order). SQLite: the prepared insert per row, in-process;
 * PostgreSQL: one multi-row insert per part, whose rows take their ids in the order given.
 */
export async function insertAudits(db: Db, rows: readonly NewAuditRow[]): Promise<void> {
  if (databaseDialect === 'sqlite') {
    for (const row of rows) await insertAudit(db, row);
    return;
  }
  for (let i = 0; i < rows.length; i += 1_000)
    await db
      .insert(auditEvents)
      .values(rows.slice(i, i + 1_000))
      .execute();
}

export const listAudit = (db: Db, siteId: number | null, opts: { action?: string; limit?: number } = {}) =>
  db
    .select()
    .from(auditEvents)
    .where(opts.action ? and(sameSite(siteId), eq(auditEvents.action, opts.action)) : sameSite(siteId))
    .orderBy(asc(auditEvents.id))
    .limit(opts.limit ?? 1_000_000)
    .execute();

/** Up to `limit` of a chain's events after the one with id `afterId`, in id order. */
export const listAuditAfter = (db: Db, siteId: number | null, afterId: number, limit: number) =>
  db
    .select()
    .from(auditEvents)
    .where(and(sameSite(siteId), gt(auditEvents.id, afterId)))
    .orderBy(asc(auditEvents.id))
    .limit(limit)
    .execute();

export type AuditFilter = { action?: string; actor?: string; entity?: string; from?: string; to?: string };

const filterWhere = (siteId: number, f: AuditFilter): SQL | undefined =>
  and(
    eq(auditEvents.siteId, siteId),
    f.action ? eq(auditEvents.action, f.action) : undefined,
    f.actor ? eq(auditEvents.actor, f.actor) : undefined,
    f.entity ? eq(auditEvents.entity, f.entity) : undefined,
    f.from ? gte(auditEvents.at, f.from) : undefined,
    // `to` is a day: everything before the next midnight.
    f.to ? lt(auditEvents.at, `${f.to.slice(0, 10)}T99`) : undefined,
  );

/** Newest first, for the screen; the chain itself is verified oldest first. */
export const findAudit = async (db: Db, siteId: number, f: AuditFilter, limit: number, offset: number) => ({
  rows: await db.select().from(auditEvents).where(filterWhere(siteId, f)).orderBy(desc(auditEvents.id)).limit(limit).offset(offset),
  total:
    (
      await db
        .select({ n: sql<number>`count(*)`.mapWith(Number) })
        .from(auditEvents)
        .where(filterWhere(siteId, f))
        .then(first)
    )?.n ?? 0,
});

/** A site's events of the given actions, oldest first (the audited states of decided records). */
export const listAuditOfActions = (db: Db, siteId: number, actions: string[]) =>
  db
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.siteId, siteId), inArray(auditEvents.action, actions)))
    .orderBy(asc(auditEvents.id))
    .execute();

/** How many events a site's chain holds up to and including `lastId`, and that event's hash. */
export const auditCountUpTo = async (db: Db, siteId: number | null, lastId: number) => ({
  events:
    (
      await db
        .select({ n: sql<number>`count(*)`.mapWith(Number) })
        .from(auditEvents)
        .where(and(sameSite(siteId), lte(auditEvents.id, lastId)))
        .then(first)
    )?.n ?? 0,
  hash:
    (
      await db
        .select({ hash: auditEvents.hash })
        .from(auditEvents)
        .where(and(sameSite(siteId), eq(auditEvents.id, lastId)))
        .then(first)
    )?.hash ?? null,
});

/** Each chain's newest event and length: what a checkpoint seals. */
export const auditHeads = (db: Db) =>
  db
    .select({ siteId: auditEvents.siteId, lastId: sql<number>`max(${auditEvents.id})`.mapWith(Number), events: sql<number>`count(*)`.mapWith(Number) })
    .from(auditEvents)
    .groupBy(auditEvents.siteId)
    .execute();
