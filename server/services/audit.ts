import crypto from 'node:crypto';
import type { Db } from '../../db/client';
import { insertAudit, lastAuditHash, listAudit, type AuditRow } from '../repositories/audit';

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

const GENESIS = '0'.repeat(64);

// Each event's hash covers its content and the previous event's hash, so editing or deleting a row breaks
// every later link. Keys are fixed in order so the same content always hashes the same.
function eventHash(e: Omit<AuditRow, 'id' | 'hash'>): string {
  const canonical = JSON.stringify([e.siteId, e.userId, e.actor, e.action, e.entity, e.entityId, e.oldValue ?? null, e.newValue ?? null, e.at, e.prevHash]);
  return crypto.createHash('sha256').update(canonical).digest('hex');
}

/** Appends one event to its site's chain. Call inside the write's transaction so both land or neither. */
export function appendAudit(db: Db, input: AuditInput): AuditRow {
  const row = {
    siteId: input.siteId,
    userId: input.userId,
    actor: input.actor,
    action: input.action,
    entity: input.entity,
    entityId: input.entityId == null ? null : String(input.entityId),
    oldValue: input.oldValue ?? null,
    newValue: input.newValue ?? null,
    at: input.at.toISOString(),
    prevHash: lastAuditHash(db, input.siteId) ?? GENESIS,
  };
  return insertAudit(db, { ...row, hash: eventHash(row) });
}

/** Walks a site's chain: `{ ok: true }` or the first event whose link or content does not match. */
export function verifyAudit(db: Db, siteId: number | null): { ok: true; events: number } | { ok: false; events: number; firstBrokenId: number } {
  const rows = listAudit(db, siteId);
  let prev = GENESIS;
  for (const r of rows) {
    if (r.prevHash !== prev || eventHash(r) !== r.hash) return { ok: false, events: rows.length, firstBrokenId: r.id };
    prev = r.hash;
  }
  return { ok: true, events: rows.length };
}
