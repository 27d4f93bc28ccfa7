import { Router } from 'express';
import { IdParam } from './params';
import { Deviation, DeviationAcknowledge, DeviationClose } from '../../src/contracts/batches';
import { allow, currentUser } from '../middleware/auth';
import { acknowledgeDeviation, closeDeviation } from '../services/deviations';
import type { AppContext } from '../context';

export function deviationsRouter(s: AppContext): Router {
  const router = Router();
  router.post('/:id/acknowledge', allow('deviations.acknowledge'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Deviation.parse(await acknowledgeDeviation(s, currentUser(req), id, DeviationAcknowledge.parse(req.body))));
  });
  router.post('/:id/close', allow('deviations.close'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Deviation.parse(await closeDeviation(s, currentUser(req), id, DeviationClose.parse(req.body))));
  });
  return router;
}
