import { Router } from 'express';
import { VesselList } from '../../src/contracts/vessels';
import { allow, ALL_ROLES, currentUser } from '../middleware/auth';
import { listVessels } from '../services/vessels';
import type { Services } from './services';

export function vesselsRouter(s: Services): Router {
  return Router().get('/', allow(...ALL_ROLES), (req, res) => {
    res.json(VesselList.parse({ vessels: listVessels(s, currentUser(req)) }));
  });
}
