import { Router } from 'express';
import { LotList } from '../../src/contracts/lots';
import { allow, ALL_ROLES, currentUser } from '../middleware/auth';
import { listLots } from '../services/lots';
import type { Services } from './services';

export function lotsRouter(s: Services): Router {
  return Router().get('/', allow(...ALL_ROLES), (req, res) => {
    res.json(LotList.parse({ lots: listLots(s, currentUser(req)) }));
  });
}
