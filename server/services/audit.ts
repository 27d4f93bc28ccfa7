import crypto from 'node:crypto';
import type Database from 'better-sqlite3';
import { databaseOf, installationDir, sqliteOf, type Db } from '../../db/client';
import { sha256 } from '../digest';
import { installationSecret } from '../installation-secrets';
import { hasCheckpoint } from './audit-checkpoints';
import { insertAudit, insertAudits, lastAuditHash, type AuditRow } from '../repositories/audit';

export type AuditInput = {
  siteId: number | null;
  userId: number | null;
  actor: string;
  action: string;
  entity: string;
  entityId?: string | number | null;
  oldValue?: unknown;
  newValue?: unknown;
  at: Date;
};

export const GENESIS = '0'.repeat(64);

type Hashed = Pick<AuditRow, 'siteId' | 'userId' | 'actor' | 'action' | 'entity' | 'entityId' | 'oldValue' | 'newValue' | 'at' | 'prevHash'>;
// Keys are fixed in order so the same content always hashes the same.
const canonical = (e: Hashed) =>
  JSON.stringify([e.siteId, e.userId, e.actor, e.action, e.entity, e.entityId, e.oldValue ?? null, e.newValue ?? null, e.at, e.prevHash]);

/**
 * Each event's hash is an HMAC (SHA-256) of its content and the previous event's hash, keyed with the
 * installation's audit key, which lives outside the database (`.audit-key` beside it). Editing or deleting a row
 * breaks every later link, and without the key no one can recompute the links after an edit.
 */
export const eventHash = (key: Buffer, e: Hashed): string => crypto.createHmac('sha256', key).update(canonical(e)).digest('hex');
// Before the chain was keyed (databases written until 2026-12-03): a plain SHA-256 of the same content.
const legacyHash = (e: Hashed): string => sha256(canonical(e));

const keys = new WeakMap<object, Buffer>();

/**
 * The audit key of a database: the installation's (`.audit-key` in its folder, made on first use); for an
 * in-memory database, a random one. On first use the chains written before the key existed are
 * re-linked with it (adoptLegacyChains).
 */
export function auditKeyOf(db: Db): Buffer {
  const database = databaseOf(db);
  let key = keys.get(database);
  if (key) return key;
  const dir = installationDir(db);
  key = dir ? installationSecret(dir, '.audit-key') : crypto.randomBytes(32);
  keys.set(database, key);
  // Chains written before the key existed are SQLite files of before 2026-12-03; PostgreSQL came later.
  const client = sqliteOf(db);
  if (client) adoptLegacyChains(db, client, key);
  return key;
}

const hashedRow = (input: AuditInput, prevHash: string) => ({
  siteId: input.siteId,
  userId: input.userId,
  actor: input.actor,
  action: input.action,
  entity: input.entity,
  entityId: input.entityId == null ? null : String(input.entityId),
  oldValue: input.oldValue ?? null,
  newValue: input.newValue ?? null,
  at: input.at.toISOString(),
  prevHash,
});

/** Appends one event to its site's chain. Call inside the write's transaction so both land or neither. */
export async function appendAudit(db: Db, input: AuditInput): Promise<AuditRow> {
  // The key first: its first use may re-link legacy chains, so the head is read after.
  const key = auditKeyOf(db);
  const row = hashedRow(input, (await lastAuditHash(db, input.siteId)) ?? GENESIS);
  return await insertAudit(db, { ...row, hash: eventHash(key, row) });
}

/** Appends events in their order, each to its site's chain (a group commit's): one head read per site, one insert. */
export async function appendAudits(db: Db, inputs: readonly AuditInput[]): Promise<void> {
  const key = auditKeyOf(db);
  const heads = new Map<number | null, string>();
  const rows = [];
  for (const input of inputs) {
    let prev = heads.get(input.siteId);
    if (prev === undefined) prev = (await lastAuditHash(db, input.siteId)) ?? GENESIS;
    const row = hashedRow(input, prev);
    const hash = eventHash(key, row);
    heads.set(input.siteId, hash);
    rows.push({ ...row, hash });
  }
  await insertAudits(db, rows);
}

type RawRow = {
  id: number;
  site_id: number | null;
  user_id: number | null;
  actor: string;
  action: string;
  entity: string;
  entity_id: string | null;
  old_value: string | null;
  new_value: string | null;
  at: string;
  prev_hash: string;
  hash: string;
};
const hashedOf = (r: RawRow): Hashed => ({
  siteId: r.site_id,
  userId: r.user_id,
  actor: r.actor,
  action: r.action,
  entity: r.entity,
  entityId: r.entity_id,
  oldValue: r.old_value == null ? null : JSON.parse(r.old_value),
  newValue: r.new_value == null ? null : JSON.parse(r.new_value),
  at: r.at,
  prevHash: r.prev_hash,
});

/**
 * Migration of a database written before the chain was keyed: a site's chain whose last event carries a plain
 * SHA-256 link, and that has no checkpoint yet, is checked link by link as it was written and, when whole,
 * re-linked with the key in one transaction (an `audit.rekeyed` event records it). A chain already broken is left
 * as it is: verify then reports it broken. A chain with a checkpoint is never re-linked.
 */
function adoptLegacyChains(db: Db, client: Database.Database, key: Buffer): void {
  const hasTable = client.prepare("select 1 from sqlite_master where type = 'table' and name = 'audit_events'").get();
  if (!hasTable) return;
  const heads = client.prepare('select * from audit_events where id in (select max(id) from audit_events group by site_id)').all() as RawRow[];
  const legacy = heads.filter((h) => legacyHash(hashedOf(h)) === h.hash && !hasCheckpoint(db, h.site_id));
  if (!legacy.length) return;
  const rowsOf = client.prepare('select * from audit_events where site_id is ? order by id');
  const relink = client.prepare('update audit_events set prev_hash = ?, hash = ? where id = ?');
  try {
    client
      .transaction(() => {
        for (const head of legacy) {
          const rows = rowsOf.all(head.site_id) as RawRow[];
          let prev = GENESIS;
          const whole = rows.every((r) => {
            const ok = r.prev_hash === prev && legacyHash(hashedOf(r)) === r.hash;
            prev = r.hash;
            return ok;
          });
          if (!whole) continue;
          prev = GENESIS;
          for (const r of rows) {
            const hash = eventHash(key, { ...hashedOf(r), prevHash: prev });
            relink.run(prev, hash, r.id);
            prev = hash;
          }
          const at = new Date().toISOString();
          const event = {
            siteId: head.site_id,
            userId: null,
            actor: 'system',
            action: 'audit.rekeyed',
            entity: 'audit',
            entityId: null,
            oldValue: null,
            newValue: { events: rows.length },
            at,
            prevHash: prev,
          };
          client
            .prepare(
              'insert into audit_events (site_id, user_id, actor, action, entity, entity_id, old_value, new_value, at, prev_hash, hash) values (?, null, ?, ?, ?, null, null, ?, ?, ?, ?)',
            )
            .run(head.site_id, event.actor, event.action, event.entity, JSON.stringify(event.newValue), at, prev, eventHash(key, event));
          console.error(`[${at}] audit chain of site ${head.site_id ?? '(none)'}: ${rows.length} events re-linked with the installation's audit key`);
        }
      })
      .immediate();
  } catch (err) {
    // Not writable now: the next connection tries again; until then verify reports the chain as not keyed.
    console.error(`[${new Date().toISOString()}] audit chain not re-linked: ${(err as Error).message}`);
  }
}
