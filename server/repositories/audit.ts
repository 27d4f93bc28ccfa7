import { and, asc, desc, eq, gt, gte, inArray, isNull, lt, lte, sql, type SQL } from 'drizzle-orm';
import { boundRow, columnPlaceholders, preparedPer, type Db } from '../../db/client';
import { auditEvents } from '../../db/schema';

export type AuditRow = typeof auditEvents.$inferSelect;

const sameSite = (siteId: number | null) => (siteId === null ? isNull(auditEvents.siteId) : eq(auditEvents.siteId, siteId));

// On every write path, so prepared (per connection or transaction handle).
const lastHashOfSite = preparedPer((db) =>
  db
    .select({ hash: auditEvents.hash })
    .from(auditEvents)
    .where(eq(auditEvents.siteId, sql.placeholder('siteId')))
    .orderBy(desc(auditEvents.id))
    .limit(1)
    .prepare(),
);
const lastHashOfNoSite = preparedPer((db) =>
  db.select({ hash: auditEvents.hash }).from(auditEvents).where(isNull(auditEvents.siteId)).orderBy(desc(auditEvents.id)).limit(1).prepare(),
);

export const lastAuditHash = (db: Db, siteId: number | null) => (siteId === null ? lastHashOfNoSite(db).get() : lastHashOfSite(db).get({ siteId }))?.hash;

type NewAuditRow = typeof auditEvents.$inferInsert;
const AUDIT_COLUMNS = ['siteId', 'userId', 'actor', 'action', 'entity', 'entityId', 'oldValue', 'newValue', 'at', 'prevHash', 'hash'] as const;
// A placeholder in a JSON column would store null as the text 'null', so a null value is written as SQL NULL
// instead: one prepared insert for each combination of null old and new values.
const insertAuditRow = preparedPer((db, nulls: { old: boolean; new: boolean }) =>
  db
    .insert(auditEvents)
    .values({
      ...(columnPlaceholders(AUDIT_COLUMNS) as unknown as NewAuditRow),
      oldValue: nulls.old ? sql`null` : sql.placeholder('oldValue'),
      newValue: nulls.new ? sql`null` : sql.placeholder('newValue'),
    })
    .returning()
    .prepare(),
);

export const insertAudit = (db: Db, row: NewAuditRow): AuditRow =>
  insertAuditRow(db, { old: row.oldValue == null, new: row.newValue == null }).get(boundRow(AUDIT_COLUMNS, row))!;

export const listAudit = (db: Db, siteId: number | null, opts: { action?: string; limit?: number } = {}) =>
  db
    .select()
    .from(auditEvents)
    .where(opts.action ? and(sameSite(siteId), eq(auditEvents.action, opts.action)) : sameSite(siteId))
    .orderBy(asc(auditEvents.id))
    .limit(opts.limit ?? 1_000_000)
    .all();

/** Up to `limit` of a chain's events after the one with id `afterId`, in id order. */
export const listAuditAfter = (db: Db, siteId: number | null, afterId: number, limit: number) =>
  db
    .select()
    .from(auditEvents)
    .where(and(sameSite(siteId), gt(auditEvents.id, afterId)))
    .orderBy(asc(auditEvents.id))
    .limit(limit)
    .all();

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
export const findAudit = (db: Db, siteId: number, f: AuditFilter, limit: number, offset: number) => ({
  rows: db.select().from(auditEvents).where(filterWhere(siteId, f)).orderBy(desc(auditEvents.id)).limit(limit).offset(offset).all(),
  total:
    db
      .select({ n: sql<number>`count(*)` })
      .from(auditEvents)
      .where(filterWhere(siteId, f))
      .get()?.n ?? 0,
});

/** A site's events of the given actions, oldest first (the audited states of decided records). */
export const listAuditOfActions = (db: Db, siteId: number, actions: string[]) =>
  db
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.siteId, siteId), inArray(auditEvents.action, actions)))
    .orderBy(asc(auditEvents.id))
    .all();

/** How many events a site's chain holds up to and including `lastId`, and that event's hash. */
export const auditCountUpTo = (db: Db, siteId: number | null, lastId: number) => ({
  events:
    db
      .select({ n: sql<number>`count(*)` })
      .from(auditEvents)
      .where(and(sameSite(siteId), lte(auditEvents.id, lastId)))
      .get()?.n ?? 0,
  hash:
    db
      .select({ hash: auditEvents.hash })
      .from(auditEvents)
      .where(and(sameSite(siteId), eq(auditEvents.id, lastId)))
      .get()?.hash ?? null,
});

/** Each chain's newest event and length: what a checkpoint seals. */
export const auditHeads = (db: Db) =>
  db
    .select({ siteId: auditEvents.siteId, lastId: sql<number>`max(${auditEvents.id})`, events: sql<number>`count(*)` })
    .from(auditEvents)
    .groupBy(auditEvents.siteId)
    .all();
