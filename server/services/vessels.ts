import type { SessionUser } from '../../src/contracts/session';
import { VesselInput, type Vessel, type VesselPatch } from '../../src/contracts/vessels';
import { writeTx, type Db } from '../../db/client';
import { HttpError, notFound } from '../http-error';
import { findSiteVessel, findSiteVesselByName, insertVessel, listSiteVessels, updateVessel, type VesselRow } from '../repositories/vessels';
import type { Services } from '../context';
import { appendAudit } from './audit';

const toVessel = ({ siteId: _s, createdAt: _c, ...v }: VesselRow): Vessel => v;

export const listVessels = async ({ db }: Services, u: SessionUser): Promise<Vessel[]> => (await listSiteVessels(db, u.siteId)).map(toVessel);

async function assertNameFree(db: Db, siteId: number, name: string, exceptId?: number) {
  const clash = await findSiteVesselByName(db, siteId, name);
  if (clash && clash.id !== exceptId) throw new HttpError(409, 'name_taken', 'A vessel with this name exists', { name: 'A vessel with this name exists' });
}

export async function createVessel({ db, clock }: Services, u: SessionUser, input: VesselInput): Promise<Vessel> {
  await assertNameFree(db, u.siteId, input.name);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const row = await insertVessel(tx, u.siteId, input);
    await appendAudit(tx, {
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
export async function changeVessel({ db, clock }: Services, u: SessionUser, id: number, patch: VesselPatch): Promise<Vessel> {
  const before = await findSiteVessel(db, u.siteId, id);
  if (!before) throw notFound('Vessel');
  const { id: _id, ...current } = toVessel(before);
  const merged = VesselInput.parse({ ...current, ...patch });
  await assertNameFree(db, u.siteId, merged.name, id);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const after = await updateVessel(tx, id, merged);
    await appendAudit(tx, {
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
