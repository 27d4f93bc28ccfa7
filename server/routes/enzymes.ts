import { Router } from 'express';
import { IdParam } from './params';
import { Enzyme, EnzymeDetail, EnzymeInput, EnzymeList, EnzymeQuery, EnzymeUpdate } from '../../src/contracts/enzymes';
import { allow, currentUser } from '../middleware/auth';
import { changeEnzyme, createEnzyme, getEnzyme, listEnzymes } from '../services/enzymes';
import type { AppContext } from '../context';

export function enzymesRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('enzymes.read'), async (req, res) => {
    res.json(EnzymeList.parse(await listEnzymes(s, currentUser(req), EnzymeQuery.parse(req.query))));
  });
  router.post('/', allow('lots.edit'), async (req, res) => {
    res.status(201).json(Enzyme.parse(await createEnzyme(s, currentUser(req), EnzymeInput.parse(req.body))));
  });
  router.get('/:id', allow('enzymes.read'), async (req, res) => {
    res.json(EnzymeDetail.parse(await getEnzyme(s, currentUser(req), IdParam.parse(req.params).id)));
  });
  router.patch('/:id', allow('lots.edit'), async (req, res) => {
    res.json(Enzyme.parse(await changeEnzyme(s, currentUser(req), IdParam.parse(req.params).id, EnzymeUpdate.parse(req.body))));
  });
  return router;
}
