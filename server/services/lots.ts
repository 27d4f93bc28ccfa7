import { writeTx, type Db } from '../../db/client';
import type { Assay } from '../../src/contracts/assays';
import { MAX_POINTS_SHOWN } from '../../src/contracts/assays';
import type { CertificateFile, Lot, LotDecision, LotDetail, LotInput, LotQuery } from '../../src/contracts/lots';
import type { SessionUser } from '../../src/contracts/session';
import { certificateDisagreement } from '../../src/planning';
import { certConversion, evaluateLot, fitHalfLifeAt } from '../../src/stability';
import { HttpError, notFound } from '../http-error';
import { listAssayPoints, listLotAssays } from '../repositories/assays';
import { insertCertificate, latestCertificate } from '../repositories/certificates';
import { findSiteEnzyme } from '../repositories/enzymes';
import { findLotByCode, findSiteLot, insertLot, listSiteLots, setLotDecision, type LotRow } from '../repositories/lots';
import type { AppContext, Services } from '../context';
import { appendAudit } from './audit';

export type LotServices = Pick<AppContext, 'db' | 'clock' | 'files'>;

const toLot = ({ siteId: _s, createdAt: _c, decidedBy: _d, ...l }: LotRow, enzymeName: string, activityUnit: string): Lot => ({
  ...l,
  enzymeName,
  activityUnit,
});

export const listLots = async ({ db }: Services, u: SessionUser, q: LotQuery = {}): Promise<Lot[]> =>
  (await listSiteLots(db, u.siteId, q)).map(({ lot, enzymeName, activityUnit }) => toLot(lot, enzymeName, activityUnit));

/** A lot of the caller's site, or 404 (also for another site's id). */
async function siteLot(db: Db, u: SessionUser, id: number) {
  const found = await findSiteLot(db, u.siteId, id);
  if (!found) throw notFound('Lot');
  return found;
}

/** A lot recipes, plans and batches may use: the site's own, and accepted by procurement; else 400. */
export async function acceptedLot(db: Db, siteId: number, lotId: number): Promise<LotRow> {
  const lot = (await findSiteLot(db, siteId, lotId))?.lot;
  if (!lot) throw new HttpError(400, 'invalid_input', 'No such lot at this site', { lotId: 'No such lot at this site' });
  if (lot.status !== 'accepted')
    throw new HttpError(400, 'lot_not_accepted', `Lot ${lot.lotCode} is ${lot.status}; only accepted lots can be planned with`, {
      lotId: 'Only accepted lots can be planned with',
    });
  return lot;
}

export async function listLotAssayViews(db: Db, u: SessionUser, lotId: number, specTempC: number): Promise<Assay[]> {
  const views: Assay[] = [];
  for (const { assay, createdBy } of await listLotAssays(db, u.siteId, lotId))
    views.push({
      id: assay.id,
      lotId: assay.lotId,
      source: assay.source,
      fileName: assay.fileName,
      scale: assay.scale,
      scaleNote: assay.scaleNote,
      createdAt: assay.createdAt,
      createdBy: createdBy ?? 'unknown',
      fit: assay.fit ?? null,
      fitProblem: assay.fitProblem,
      atSpec: assay.fit ? fitHalfLifeAt(assay.fit, specTempC) : null,
      pointCount: assay.pointCount,
      points: (await listAssayPoints(db, assay.id, MAX_POINTS_SHOWN)).map(({ id: _i, assayId: _a, ...p }) => p),
    });
  return views;
}

async function certificateView(db: Db, siteId: number, lotId: number): Promise<CertificateFile | null> {
  const c = await latestCertificate(db, siteId, lotId);
  if (!c) return null;
  const { fileName, mimeType, sizeBytes, sha256, uploadedAt } = c.file;
  return { fileName, mimeType, sizeBytes, sha256, uploadedAt, uploadedBy: c.uploadedBy ?? 'unknown' };
}

export async function getLot({ db }: Services, u: SessionUser, id: number): Promise<LotDetail> {
  const { lot, enzymeName, activityUnit, decidedBy } = await siteLot(db, u, id);
  const enzyme = (await findSiteEnzyme(db, u.siteId, lot.enzymeId))!;
  const assays = await listLotAssayViews(db, u, id, enzyme.specTempC);
  const fitted = assays.find((a) => a.fit);
  const { siteId: _s, createdAt: _c, ...e } = enzyme;
  return {
    lot: toLot(lot, enzymeName, activityUnit),
    enzyme: e,
    conversion: certConversion(lot.certStability),
    certificate: await certificateView(db, u.siteId, id),
    assays,
    evaluation: evaluateLot(enzyme, lot, fitted?.fit ?? null),
    disagreement: certificateDisagreement({
      certKdPerH: lot.certKdPerH,
      certTempC: lot.certTempC,
      fit: fitted?.fit ? { assayId: fitted.id, createdAt: fitted.createdAt, fit: fitted.fit } : null,
    }),
    decidedBy: decidedBy ?? null,
  };
}

/** Registers an incoming lot; it starts quarantined until procurement decides. */
export async function createLot({ db, clock }: Services, u: SessionUser, input: LotInput): Promise<Lot> {
  const enzyme = await findSiteEnzyme(db, u.siteId, input.enzymeId);
  if (!enzyme) throw new HttpError(400, 'invalid_input', 'Some fields are not valid', { enzymeId: 'No such enzyme at this site' });
  if (await findLotByCode(db, enzyme.id, input.lotCode)) {
    throw new HttpError(409, 'duplicate_lot', 'This lot code is already registered for this enzyme', { lotCode: 'Already registered' });
  }
  const conv = certConversion(input.certStability);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const row = await insertLot(tx, {
      siteId: u.siteId,
      enzymeId: enzyme.id,
      lotCode: input.lotCode,
      receivedOn: input.receivedOn,
      expiresOn: input.expiresOn,
      quantityKg: input.quantityKg,
      certActivity: input.certActivity,
      certStability: input.certStability,
      certKdPerH: conv.kdPerH,
      certTempC: conv.tempC,
      status: 'quarantined',
    });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'lot.create',
      entity: 'lot',
      entityId: row.id,
      newValue: { ...input, certKdPerH: conv.kdPerH },
      at: now,
    });
    return toLot(row, enzyme.name, enzyme.activityUnit);
  });
}

/** Procurement's decision on a quarantined lot, with its reason and the evaluation it was shown, audited. */
export async function decideLot(s: Services, u: SessionUser, id: number, d: LotDecision): Promise<LotDetail> {
  const { db, clock } = s;
  const before = await getLot(s, u, id);
  if (before.lot.status !== 'quarantined') {
    throw new HttpError(409, 'already_decided', `This lot was already ${before.lot.status}`);
  }
  const now = clock.now();
  const status = d.decision === 'accept' ? 'accepted' : 'rejected';
  await writeTx(db, async (tx) => {
    await setLotDecision(tx, id, { status, decisionReason: d.reason, decidedBy: u.id, decidedAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: `lot.${d.decision}`,
      entity: 'lot',
      entityId: id,
      oldValue: { status: before.lot.status },
      newValue: {
        status,
        reason: d.reason,
        basis: before.evaluation.basis,
        comparedH: before.evaluation.comparedH,
        recommendation: before.evaluation.recommendation,
      },
      at: now,
    });
  });
  return getLot(s, u, id);
}

// Magic numbers at the start of each accepted type; the declared type and the name's extension must agree.
const SIGNATURES: { mime: CertificateFile['mimeType']; bytes: number[]; ext: RegExp; label: string }[] = [
  { mime: 'application/pdf', bytes: [0x25, 0x50, 0x44, 0x46, 0x2d], ext: /\.pdf$/i, label: 'PDF' },
  { mime: 'image/png', bytes: [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a], ext: /\.png$/i, label: 'PNG' },
  { mime: 'image/jpeg', bytes: [0xff, 0xd8, 0xff], ext: /\.jpe?g$/i, label: 'JPEG' },
];

export const MAX_CERTIFICATE_BYTES = 10 * 1024 * 1024;

/** The type a file's first bytes show, or null when it is none of PDF, PNG or JPEG. */
export function sniffCertificateType(bytes: Buffer): CertificateFile['mimeType'] | null {
  return SIGNATURES.find((s) => s.bytes.every((b, i) => bytes[i] === b))?.mime ?? null;
}

// A name fit for a Content-Disposition header and a file system: no path, no control characters.
const safeName = (name: string) => (name.split(/[\\/]/).pop() ?? 'certificate').replace(/[^\w.\- ()]/g, '_').slice(0, 120) || 'certificate';

export async function attachCertificate(
  s: LotServices,
  u: SessionUser,
  id: number,
  file: { originalname: string; buffer: Buffer } | undefined,
): Promise<CertificateFile> {
  await siteLot(s.db, u, id);
  if (!file) throw new HttpError(400, 'file_missing', 'Attach the certificate as the form field "file"', { file: 'Choose a PDF, PNG or JPEG file' });
  if (file.buffer.length === 0) throw new HttpError(400, 'file_empty', 'The file is empty', { file: 'The file is empty' });
  const mime = sniffCertificateType(file.buffer);
  const byName = SIGNATURES.find((sig) => sig.ext.test(file.originalname));
  if (!mime) {
    const named = byName ? ` It is named ${byName.label} but its content is not one.` : '';
    throw new HttpError(415, 'unsupported_type', `Certificates must be PDF, PNG or JPEG.${named}`, { file: 'Not a PDF, PNG or JPEG file' });
  }
  if (!byName || byName.mime !== mime) {
    const label = SIGNATURES.find((sig) => sig.mime === mime)!.label;
    throw new HttpError(415, 'type_mismatch', `The file's content is ${label} but its name says otherwise; rename it and try again`, {
      file: 'Name and content disagree',
    });
  }
  const { sha256 } = s.files.put(file.buffer);
  const now = s.clock.now();
  const fileName = safeName(file.originalname);
  await writeTx(s.db, async (tx) => {
    await insertCertificate(tx, {
      siteId: u.siteId,
      lotId: id,
      fileName,
      mimeType: mime,
      sizeBytes: file.buffer.length,
      sha256,
      uploadedBy: u.id,
      uploadedAt: now.toISOString(),
    });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'lot.certificate.upload',
      entity: 'lot',
      entityId: id,
      newValue: { fileName, mimeType: mime, sizeBytes: file.buffer.length, sha256 },
      at: now,
    });
  });
  return (await certificateView(s.db, u.siteId, id))!;
}

export async function readCertificate(s: LotServices, u: SessionUser, id: number): Promise<{ file: CertificateFile; bytes: Buffer }> {
  await siteLot(s.db, u, id);
  const file = await certificateView(s.db, u.siteId, id);
  if (!file) throw notFound('Certificate');
  const bytes = s.files.get(file.sha256);
  if (!bytes) throw new HttpError(410, 'file_unavailable', 'The stored certificate is missing or no longer matches its SHA-256');
  return { file, bytes };
}
