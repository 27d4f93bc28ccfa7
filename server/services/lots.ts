import type { Lot } from '../../src/contracts/lots';
import type { SessionUser } from '../../src/contracts/session';
import { listSiteLots } from '../repositories/lots';
import type { Services } from '../routes/services';

export const listLots = ({ db }: Services, u: SessionUser): Lot[] =>
  listSiteLots(db, u.siteId).map(({ lot, enzymeName }) => ({ ...lot, enzymeName }) as Lot);
