import { Router } from 'express';
import { IdParam } from './params';
import { Vessel, VesselInput, VesselList, VesselPatch } from '../../src/contracts/vessels';
import { allow, currentUser } from '../middleware/auth';
import { changeVessel, createVessel, listVessels } from '../services/vessels';
import type { AppContext } from '../context';

export function vesselsRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('vessels.read'), async (req, res) => {
    res.json(VesselList.parse({ vessels: await listVessels(s, currentUser(req)) }));
  });
  router.post('/', allow('vessels.edit'), async (req, res) => {
    res.status(201).json(Vessel.parse(await createVessel(s, currentUser(req), VesselInput.parse(req.body))));
  });
  router.patch('/:id', allow('vessels.edit'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Vessel.parse(await changeVessel(s, currentUser(req), id, VesselPatch.parse(req.body))));
  });
  return router;
}
