import type { SessionUser } from '../../src/contracts/session';
import type { SiteSummary } from '../../src/contracts/site';
import { ROLES } from '../../src/contracts/roles';
import { notFound } from '../http-error';
import { countSiteRecords, findSite } from '../repositories/sites';
import { countUsersByRole } from '../repositories/users';
import type { Services } from '../routes/services';

export function siteSummary({ db }: Services, u: SessionUser): SiteSummary {
  const site = findSite(db, u.siteId);
  if (!site) throw notFound('Site');
  const byRole = countUsersByRole(db, u.siteId);
  const usersByRole = Object.fromEntries(ROLES.map((r) => [r, byRole.find((b) => b.role === r)?.n ?? 0])) as SiteSummary['usersByRole'];
  return {
    id: site.id,
    name: site.name,
    timeZone: site.timeZone,
    counts: {
      users: byRole.reduce((a, b) => a + b.n, 0),
      activeUsers: byRole.reduce((a, b) => a + (b.active ?? 0), 0),
      ...countSiteRecords(db, u.siteId),
    },
    usersByRole,
  };
}
