import type { SessionUser } from '../../src/contracts/session';
import { VesselInput, type Vessel, type VesselPatch } from '../../src/contracts/vessels';
import { writeTx, type Db } from '../../db/client';
import { HttpError, notFound } from '../http-error';
import { findSiteVessel, findSiteVesselByName, insertVessel, listSiteVessels, updateVessel, type VesselRow } from '../repositories/vessels';
import type { Services } from '../context';
import { appendAudit } from './audit';

const toVessel = ({ siteId: _s, createdAt: _c, ...v }: VesselRow): Vessel => v;

export const listVessels = ({ db }: Services, u: SessionUser): Vessel[] => listSiteVessels(db, u.siteId).map(toVessel);

function assertNameFree(db: Db, siteId: number, name: string, exceptId?: number) {
  const clash = findSiteVesselByName(db, siteId, name);
  if (clash && clash.id !== exceptId) throw new HttpError(409, 'name_taken', 'A vessel with this name exists', { name: 'A vessel with this name exists' });
}

export function createVessel({ db, clock }: Services, u: SessionUser, input: VesselInput): Vessel {
  assertNameFree(db, u.siteId, input.name);
  const now = clock.now();
  return writeTx(db, (tx) => {
    const row = insertVessel(tx, u.siteId, input);
    appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'vessel.create',
      entity: 'vessel',
      entityId: row.id,
      newValue: toVessel(row),
      at: now,
    });
    return toVessel(row);
  });
}

/** Applies a partial change; the merged vessel must still pass every limit rule. */
export function changeVessel({ db, clock }: Services, u: SessionUser, id: number, patch: VesselPatch): Vessel {
  const before = findSiteVessel(db, u.siteId, id);
  if (!before) throw notFound('Vessel');
  const { id: _id, ...current } = toVessel(before);
  const merged = VesselInput.parse({ ...current, ...patch });
  assertNameFree(db, u.siteId, merged.name, id);
  const now = clock.now();
  return writeTx(db, (tx) => {
    const after = updateVessel(tx, id, merged);
    appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'vessel.update',
      entity: 'vessel',
      entityId: id,
      oldValue: toVessel(before),
      newValue: toVessel(after),
      at: now,
    });
    return toVessel(after);
  });
}
