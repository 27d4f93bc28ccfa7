import type { AuditEvent, AuditPage, AuditQuery, AuditVerification } from '../../src/contracts/audit-events';
import type { SessionUser } from '../../src/contracts/session';
import { toCsv } from '../csv';
import { findAudit, type AuditRow } from '../repositories/audit';
import type { Services } from '../context';
import { sealAudit, verifyAuditInTurns } from './audit-verify';

const toEvent = (r: AuditRow): AuditEvent => ({
  id: r.id,
  at: r.at,
  actor: r.actor,
  action: r.action,
  entity: r.entity,
  entityId: r.entityId,
  oldValue: r.oldValue ?? null,
  newValue: r.newValue ?? null,
  hash: r.hash,
  prevHash: r.prevHash,
});

export async function searchAudit({ db }: Services, u: SessionUser, q: AuditQuery): Promise<AuditPage> {
  const { rows, total } = await findAudit(db, u.siteId, q, q.limit, q.offset);
  return { events: rows.map(toEvent), total };
}

export const verifySiteAudit = ({ db }: Services, u: SessionUser): Promise<AuditVerification> => verifyAuditInTurns(db, u.siteId);

/** Seals the site's chain now (a checkpoint outside the database), when it moved since the last one. */
export const checkpointSiteAudit = async ({ db, clock }: Services, u: SessionUser) => ({ written: await sealAudit(db, clock.now(), u.siteId) });

/** The filtered trail as CSV, oldest first, with the hashes so the export can be checked on its own. */
export async function auditCsv({ db }: Services, u: SessionUser, q: AuditQuery): Promise<string> {
  const { rows } = await findAudit(db, u.siteId, q, 1_000_000, 0);
  return toCsv(
    ['id', 'at_utc', 'actor', 'action', 'entity', 'entity_id', 'old_value', 'new_value', 'prev_hash', 'hash'],
    rows.reverse().map((r) => [r.id, r.at, r.actor, r.action, r.entity, r.entityId, r.oldValue, r.newValue, r.prevHash, r.hash]),
  );
}
