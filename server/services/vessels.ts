import type { SessionUser } from '../../src/contracts/session';
import type { Vessel } from '../../src/contracts/vessels';
import { listSiteVessels } from '../repositories/vessels';
import type { Services } from '../routes/services';

export const listVessels = ({ db }: Services, u: SessionUser): Vessel[] => listSiteVessels(db, u.siteId);
