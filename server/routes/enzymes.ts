import { Router } from 'express';
import { IdParam } from './params';
import { Enzyme, EnzymeDetail, EnzymeInput, EnzymeList, EnzymeQuery, EnzymeUpdate } from '../../src/contracts/enzymes';
import { LOT_EDITORS } from '../../src/contracts/lots';
import { allow, ALL_ROLES, currentUser } from '../middleware/auth';
import { changeEnzyme, createEnzyme, getEnzyme, listEnzymes } from '../services/enzymes';
import type { AppContext } from '../context';

export function enzymesRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow(...ALL_ROLES), (req, res) => {
    res.json(EnzymeList.parse(listEnzymes(s, currentUser(req), EnzymeQuery.parse(req.query))));
  });
  router.post('/', allow(...LOT_EDITORS), (req, res) => {
    res.status(201).json(Enzyme.parse(createEnzyme(s, currentUser(req), EnzymeInput.parse(req.body))));
  });
  router.get('/:id', allow(...ALL_ROLES), (req, res) => {
    res.json(EnzymeDetail.parse(getEnzyme(s, currentUser(req), IdParam.parse(req.params).id)));
  });
  router.patch('/:id', allow(...LOT_EDITORS), (req, res) => {
    res.json(Enzyme.parse(changeEnzyme(s, currentUser(req), IdParam.parse(req.params).id, EnzymeUpdate.parse(req.body))));
  });
  return router;
}
