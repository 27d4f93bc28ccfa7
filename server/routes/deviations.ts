import { Router } from 'express';
import { z } from 'zod';
import { Deviation, DEVIATION_ACKNOWLEDGERS, DEVIATION_CLOSERS, DeviationAcknowledge, DeviationClose } from '../../src/contracts/batches';
import { allow, currentUser } from '../middleware/auth';
import { acknowledgeDeviation, closeDeviation } from '../services/deviations';
import type { Services } from './services';

const IdParam = z.object({ id: z.coerce.number().int().positive() });

export function deviationsRouter(s: Services): Router {
  const router = Router();
  router.post('/:id/acknowledge', allow(...DEVIATION_ACKNOWLEDGERS), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Deviation.parse(acknowledgeDeviation(s, currentUser(req), id, DeviationAcknowledge.parse(req.body))));
  });
  router.post('/:id/close', allow(...DEVIATION_CLOSERS), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Deviation.parse(closeDeviation(s, currentUser(req), id, DeviationClose.parse(req.body))));
  });
  return router;
}
