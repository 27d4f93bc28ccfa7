import type { Enzyme, EnzymeDetail, EnzymeInput, EnzymeList, EnzymeQuery, EnzymeUpdate, LotHistoryPoint } from '../../src/contracts/enzymes';
import type { SessionUser } from '../../src/contracts/session';
import { certHalfLifeAt, fitHalfLifeAt } from '../../src/stability';
import { HttpError, notFound } from '../http-error';
import { listSiteFits } from '../repositories/assays';
import { findSiteEnzyme, findSiteEnzymeByName, insertEnzyme, querySiteEnzymes, updateEnzyme, type EnzymeRow } from '../repositories/enzymes';
import { listSiteLots } from '../repositories/lots';
import type { Services } from '../context';
import { writeTx, type Db } from '../../db/client';
import { appendAudit } from './audit';

const toEnzyme = ({ siteId: _s, createdAt: _c, ...e }: EnzymeRow): Enzyme => e;

export async function listEnzymes({ db }: Services, u: SessionUser, q: EnzymeQuery): Promise<EnzymeList> {
  const { rows, total } = await querySiteEnzymes(db, u.siteId, q);
  return { enzymes: rows.map(toEnzyme), total, page: q.page, pageSize: q.pageSize };
}

/** The enzyme and each of its lots' half-life at the specification temperature, oldest lot first. */
export async function getEnzyme({ db }: Services, u: SessionUser, id: number): Promise<EnzymeDetail> {
  const e = await findSiteEnzyme(db, u.siteId, id);
  if (!e) throw notFound('Enzyme');
  const fits = new Map<number, NonNullable<Awaited<ReturnType<typeof listSiteFits>>[number]['fit']>>();
  for (const f of await listSiteFits(db, u.siteId)) if (f.fit && !fits.has(f.lotId)) fits.set(f.lotId, f.fit);
  const history: LotHistoryPoint[] = (await listSiteLots(db, u.siteId, { enzymeId: id }))
    .map(({ lot }) => {
      const base = { lotId: lot.id, lotCode: lot.lotCode, receivedOn: lot.receivedOn, status: lot.status };
      const fit = fits.get(lot.id);
      if (fit) {
        const est = fitHalfLifeAt(fit, e.specTempC);
        return { ...base, basis: 'assay' as const, halfLifeH: est.halfLifeH, lowerH: est.lowerH, upperH: est.upperH };
      }
      const cert = certHalfLifeAt(lot.certStability, e.specTempC);
      return { ...base, basis: cert === null ? ('none' as const) : ('certificate' as const), halfLifeH: cert, lowerH: null, upperH: null };
    })
    .sort((a, b) => a.receivedOn.localeCompare(b.receivedOn) || a.lotCode.localeCompare(b.lotCode));
  return { enzyme: toEnzyme(e), history };
}

async function checkNameFree(db: Db, siteId: number, name: string, selfId?: number) {
  const clash = await findSiteEnzymeByName(db, siteId, name);
  if (clash && clash.id !== selfId) throw new HttpError(409, 'duplicate_name', 'An enzyme with this name exists', { name: 'Already used by another enzyme' });
}

export async function createEnzyme({ db, clock }: Services, u: SessionUser, input: EnzymeInput): Promise<Enzyme> {
  await checkNameFree(db, u.siteId, input.name);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const row = await insertEnzyme(tx, u.siteId, input);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'enzyme.create',
      entity: 'enzyme',
      entityId: row.id,
      newValue: input,
      at: now,
    });
    return toEnzyme(row);
  });
}

export async function changeEnzyme({ db, clock }: Services, u: SessionUser, id: number, patch: EnzymeUpdate): Promise<Enzyme> {
  const before = await findSiteEnzyme(db, u.siteId, id);
  if (!before) throw notFound('Enzyme');
  if (patch.name !== undefined) await checkNameFree(db, u.siteId, patch.name, id);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const after = await updateEnzyme(tx, id, patch);
    const keys = Object.keys(patch) as (keyof EnzymeUpdate)[];
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'enzyme.update',
      entity: 'enzyme',
      entityId: id,
      oldValue: Object.fromEntries(keys.map((k) => [k, before[k]])),
      newValue: Object.fromEntries(keys.map((k) => [k, after[k]])),
      at: now,
    });
    return toEnzyme(after);
  });
}
