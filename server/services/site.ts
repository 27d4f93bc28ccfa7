import type { SessionUser } from '../../src/contracts/session';
import type { SitePatch, SiteSummary } from '../../src/contracts/site';
import { writeTx } from '../../db/client';
import { appendAudit } from './audit';
import { ROLES } from '../../src/contracts/roles';
import { notFound } from '../http-error';
import { countSiteRecords, findSite, updateSite } from '../repositories/sites';
import { countUsersByRole } from '../repositories/users';
import type { Services } from '../context';

export async function siteSummary({ db }: Services, u: SessionUser): Promise<SiteSummary> {
  const site = await findSite(db, u.siteId);
  if (!site) throw notFound('Site');
  const byRole = await countUsersByRole(db, u.siteId);
  const usersByRole = Object.fromEntries(ROLES.map((r) => [r, byRole.find((b) => b.role === r)?.n ?? 0])) as SiteSummary['usersByRole'];
  return {
    id: site.id,
    name: site.name,
    timeZone: site.timeZone,
    currency: site.currency,
    counts: {
      users: byRole.reduce((a, b) => a + b.n, 0),
      activeUsers: byRole.reduce((a, b) => a + (b.active ?? 0), 0),
      ...(await countSiteRecords(db, u.siteId)),
    },
    usersByRole,
  };
}

/** Sets the site's currency; amounts are shown in it from the next read on (nothing is converted). Audited. */
export async function changeSite(s: Services, u: SessionUser, patch: SitePatch): Promise<SiteSummary> {
  const site = await findSite(s.db, u.siteId);
  if (!site) throw notFound('Site');
  const now = s.clock.now();
  await writeTx(s.db, async (tx) => {
    await updateSite(tx, u.siteId, patch);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'site.update',
      entity: 'site',
      entityId: u.siteId,
      oldValue: { currency: site.currency },
      newValue: patch,
      at: now,
    });
  });
  return siteSummary(s, u);
}
