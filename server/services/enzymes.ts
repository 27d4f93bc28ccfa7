import type { Enzyme } from '../../src/contracts/enzymes';
import type { SessionUser } from '../../src/contracts/session';
import { listSiteEnzymes } from '../repositories/enzymes';
import type { Services } from '../routes/services';

export const listEnzymes = ({ db }: Services, u: SessionUser): Enzyme[] => listSiteEnzymes(db, u.siteId);
