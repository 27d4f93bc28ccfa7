import { writeTx, type Db } from '../../db/client';
import {
  DEFAULT_LINK_SETTINGS,
  type BatchLink,
  type LinkStatus,
  type LinkStatusList,
  type CertificateInfo,
  type LinkSettings,
  type LinkSettingsPatch,
  type TrustRequest,
  type VesselSource,
  type VesselSourceParsed,
} from '../../src/contracts/control-link';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError, notFound } from '../http-error';
import { certificateInfo, sameThumbprint } from '../opcua/pki';
import { isNodeId, LinkRefused, serverCertificate } from '../opcua/reader';
import {
  deleteVesselSource,
  findLinkSettings,
  findVesselSource,
  listBatchGaps,
  listSiteSources,
  updateVesselSource,
  upsertLinkSettings,
  upsertVesselSource,
  type VesselSourceRow,
} from '../repositories/control-link';
import { findSiteBatch } from '../repositories/batches';
import { findUserByEmail, findUserWithSite, insertUser, updateUser } from '../repositories/users';
import { findSiteVessel } from '../repositories/vessels';
import type { AppContext, Services } from '../context';
import { appendAudit } from './audit';
import type { ControlLink } from './control-link';

/** What the control-link routes need: the services and the running link (its PKI, and a nudge after changes). */
export type LinkServices = Pick<AppContext, 'db' | 'clock' | 'controlLink'>;

function running(link: ControlLink | null): ControlLink {
  if (!link) throw new HttpError(503, 'link_off', 'The control-system link is not running on this server');
  return link;
}

const toSource = (r: VesselSourceRow, vesselName: string): VesselSource => ({
  vesselId: r.vesselId,
  vesselName,
  endpointUrl: r.endpointUrl,
  nodeId: r.nodeId,
  unit: r.unit,
  securityPolicy: r.securityPolicy,
  securityMode: r.securityMode,
  userName: r.userName,
  hasPassword: !!r.password,
  userCertificate: r.userCertificate,
  isEnabled: r.isEnabled,
  trustedThumbprint: r.trustedThumbprint,
  trustedAt: r.trustedAt,
  updatedAt: r.updatedAt,
});

export const listSources = async ({ db }: Services, u: SessionUser): Promise<VesselSource[]> =>
  (await listSiteSources(db, u.siteId)).map((r) => toSource(r.source, r.vesselName));

async function loadVessel(db: Db, siteId: number, vesselId: number) {
  const v = await findSiteVessel(db, siteId, vesselId);
  if (!v) throw notFound('Vessel');
  return v;
}

async function loadSource(db: Db, siteId: number, vesselId: number) {
  const vessel = await loadVessel(db, siteId, vesselId);
  const source = await findVesselSource(db, siteId, vesselId);
  if (!source) throw new HttpError(404, 'not_found', `${vessel.name} has no control-system source`);
  return { vessel, source };
}

/** Sets a vessel's source. A new address or security forgets the trusted server certificate. */
export async function saveSource(
  { db, clock, controlLink: link }: LinkServices,
  u: SessionUser,
  vesselId: number,
  input: VesselSourceParsed,
): Promise<VesselSource> {
  const vessel = await loadVessel(db, u.siteId, vesselId);
  if (!isNodeId(input.nodeId))
    throw new HttpError(400, 'invalid_input', 'Not an OPC UA node id', { nodeId: 'A node id such as ns=2;s=R101.TT01 or ns=3;i=1042' });
  const before = await findVesselSource(db, u.siteId, vesselId);
  const sameServer =
    before && before.endpointUrl === input.endpointUrl && before.securityPolicy === input.securityPolicy && before.securityMode === input.securityMode;
  const now = clock.now().toISOString();
  const row = await writeTx(db, async (tx) => {
    const saved = await upsertVesselSource(tx, {
      siteId: u.siteId,
      vesselId,
      endpointUrl: input.endpointUrl,
      nodeId: input.nodeId,
      unit: input.unit,
      securityPolicy: input.securityPolicy,
      securityMode: input.securityMode,
      userName: input.userName || null,
      password: input.userCertificate ? null : input.password === undefined ? (before?.password ?? null) : input.password || null,
      userCertificate: input.userCertificate,
      isEnabled: input.isEnabled,
      trustedThumbprint: sameServer ? before.trustedThumbprint : null,
      trustedAt: sameServer ? before.trustedAt : null,
      trustedBy: sameServer ? before.trustedBy : null,
      updatedAt: now,
    });
    const audited = (r: VesselSourceRow | undefined) => (r ? toSource(r, vessel.name) : null);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'vessel_source.save',
      entity: 'vessel',
      entityId: vesselId,
      oldValue: audited(before),
      newValue: audited(saved),
      at: new Date(now),
    });
    if (input.securityPolicy === 'None')
      await appendAudit(tx, {
        siteId: u.siteId,
        userId: u.id,
        actor: u.email,
        action: 'vessel_source.security_none',
        entity: 'vessel',
        entityId: vesselId,
        newValue: { endpointUrl: input.endpointUrl, confirmed: 'temperatures and password travel unencrypted and unsigned' },
        at: new Date(now),
      });
    return saved;
  });
  link?.changed();
  return toSource(row, vessel.name);
}

export async function removeSource({ db, clock, controlLink: link }: LinkServices, u: SessionUser, vesselId: number): Promise<void> {
  const { vessel, source } = await loadSource(db, u.siteId, vesselId);
  await writeTx(db, async (tx) => {
    await deleteVesselSource(tx, source.id);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'vessel_source.remove',
      entity: 'vessel',
      entityId: vesselId,
      oldValue: toSource(source, vessel.name),
      at: clock.now(),
    });
  });
  link?.changed();
}

async function fetchCertificate(maybe: ControlLink | null, source: VesselSourceRow): Promise<Buffer> {
  if (source.securityPolicy === 'None') throw new HttpError(409, 'no_security', 'Security None uses no certificates');
  const link = running(maybe);
  try {
    return await serverCertificate({ ...source, pki: link.pki, onRequest: link.onRequest });
  } catch (err) {
    if (err instanceof LinkRefused) throw new HttpError(502, 'link_refused', err.message);
    throw err;
  }
}

/** The certificate the server presents now, for an admin to compare with what the plant's owner reads out. */
export async function sourceCertificate({ db, controlLink: link }: LinkServices, u: SessionUser, vesselId: number): Promise<CertificateInfo> {
  const { source } = await loadSource(db, u.siteId, vesselId);
  return certificateInfo(await fetchCertificate(link, source));
}

/**
 * Trusts the server's certificate, only if it is still the one the admin was shown (same thumbprint), and
 * records who did and when.
 */
export async function trustSource(
  { db, clock, controlLink: link }: LinkServices,
  u: SessionUser,
  vesselId: number,
  input: TrustRequest,
): Promise<VesselSource> {
  const { vessel, source } = await loadSource(db, u.siteId, vesselId);
  const der = await fetchCertificate(link, source);
  const info = certificateInfo(der);
  if (!sameThumbprint(info.thumbprint, input.thumbprint))
    throw new HttpError(409, 'thumbprint_mismatch', `The server now presents a certificate with thumbprint ${info.thumbprint}, not the one confirmed`, {
      thumbprint: 'Not the certificate the server presents',
    });
  await running(link).pki.trust(der);
  const now = clock.now();
  const row = await writeTx(db, async (tx) => {
    const r = await updateVesselSource(tx, source.id, {
      trustedThumbprint: info.thumbprint,
      trustedAt: now.toISOString(),
      trustedBy: u.id,
      updatedAt: now.toISOString(),
    });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'vessel_source.trust',
      entity: 'vessel',
      entityId: vesselId,
      oldValue: { trustedThumbprint: source.trustedThumbprint },
      newValue: { endpointUrl: source.endpointUrl, ...info },
      at: now,
    });
    return r;
  });
  link?.changed();
  return toSource(row, vessel.name);
}

// Settings -----------------------------------------------------------------------------------------------

export async function linkSettingsOf(db: Db, siteId: number): Promise<LinkSettings> {
  const row = await findLinkSettings(db, siteId);
  return row ? { samplingIntervalMs: row.samplingIntervalMs, deadbandC: row.deadbandC } : { ...DEFAULT_LINK_SETTINGS };
}

export async function changeLinkSettings({ db, clock, controlLink: link }: LinkServices, u: SessionUser, patch: LinkSettingsPatch): Promise<LinkSettings> {
  const before = await linkSettingsOf(db, u.siteId);
  const after = { ...before, ...patch };
  const now = clock.now();
  await writeTx(db, async (tx) => {
    await upsertLinkSettings(tx, { siteId: u.siteId, ...after, updatedAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'link_settings.update',
      entity: 'link_settings',
      entityId: u.siteId,
      oldValue: before,
      newValue: after,
      at: now,
    });
  });
  link?.changed();
  return after;
}

// The control system as the one who "entered" its readings ------------------------------------------------

const systemEmail = (siteId: number) => `control-system+site${siteId}@yieldpoint.invalid`;

/**
 * The site's control-system account: the readings it stores name it, and its audit events carry it. It cannot
 * sign in (inactive, and no password hash matches '!').
 */
export async function controlSystemUser(db: Db, siteId: number): Promise<SessionUser> {
  let row = await findUserByEmail(db, systemEmail(siteId));
  if (!row) {
    // Looked up again inside the write: two callers at once (two values, two processes) create it once.
    row = await writeTx(db, async (tx) => {
      const existing = await findUserByEmail(tx, systemEmail(siteId));
      if (existing) return existing;
      const created = await insertUser(tx, { siteId, email: systemEmail(siteId), name: 'Control system', role: 'operator', passwordHash: '!' });
      await updateUser(tx, created.id, { isActive: false });
      await appendAudit(tx, {
        siteId,
        userId: null,
        actor: 'system',
        action: 'user.create_control_system',
        entity: 'user',
        entityId: created.id,
        newValue: { email: created.email, isActive: false },
        at: new Date(),
      });
      return created;
    });
  }
  const j = (await findUserWithSite(db, row.id))!;
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    siteId,
    siteName: j.siteName,
    siteTimeZone: j.siteTimeZone,
    siteCurrency: j.siteCurrency,
    cautionsAcknowledgedAt: null,
  };
}

// Status -------------------------------------------------------------------------------------------------

const gapsOf = async (db: Db, siteId: number, batchId: number) =>
  (await listBatchGaps(db, siteId, batchId)).map((g) => ({ fromAt: g.fromAt, toAt: g.toAt, reason: g.reason }));

/** A source's status while nothing is read from it: no batch, no value, no errors yet. */
export const quietLink = (row: { source: { vesselId: number }; vesselName: string }, state: 'off' | 'idle' | 'disabled'): LinkStatus => ({
  vesselId: row.source.vesselId,
  vesselName: row.vesselName,
  batchId: null,
  state,
  lastValueC: null,
  lastValueAt: null,
  ageS: null,
  lastError: null,
  errors: 0,
  stored: 0,
});

/** Each source's link now; without a running link every source is 'off'. */
export const linkStatus = async ({ db, controlLink: link }: LinkServices, u: SessionUser): Promise<LinkStatusList> =>
  link
    ? { links: await link.status(u.siteId), certificate: link.pki.certificate(), userCertificate: link.pki.userCertificate() }
    : {
        links: (await listSiteSources(db, u.siteId)).map((r) => quietLink(r, 'off')),
        certificate: null,
        userCertificate: null,
      };

export async function batchLinkOf({ db, controlLink: link }: LinkServices, u: SessionUser, batchId: number): Promise<BatchLink> {
  if (!(await findSiteBatch(db, u.siteId, batchId))) throw notFound('Batch');
  return { link: (await link?.batchLink(u.siteId, batchId)) ?? null, gaps: await gapsOf(db, u.siteId, batchId) };
}
