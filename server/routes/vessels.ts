import { Router } from 'express';
import { IdParam } from './params';
import { Vessel, VesselInput, VesselList, VesselPatch } from '../../src/contracts/vessels';
import { allow, currentUser } from '../middleware/auth';
import { changeVessel, createVessel, listVessels } from '../services/vessels';
import type { AppContext } from '../context';

export function vesselsRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('vessels.read'), (req, res) => {
    res.json(VesselList.parse({ vessels: listVessels(s, currentUser(req)) }));
  });
  router.post('/', allow('vessels.edit'), (req, res) => {
    res.status(201).json(Vessel.parse(createVessel(s, currentUser(req), VesselInput.parse(req.body))));
  });
  router.patch('/:id', allow('vessels.edit'), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Vessel.parse(changeVessel(s, currentUser(req), id, VesselPatch.parse(req.body))));
  });
  return router;
}
