import { Router } from 'express';
import { EnzymeList } from '../../src/contracts/enzymes';
import { allow, ALL_ROLES, currentUser } from '../middleware/auth';
import { listEnzymes } from '../services/enzymes';
import type { Services } from './services';

export function enzymesRouter(s: Services): Router {
  return Router().get('/', allow(...ALL_ROLES), (req, res) => {
    res.json(EnzymeList.parse({ enzymes: listEnzymes(s, currentUser(req)) }));
  });
}
