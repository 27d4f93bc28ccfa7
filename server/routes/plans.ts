import { Router } from 'express';
import { IdParam } from './params';
import { Plan, PlanInputs, PlanList, PlanQuery } from '../../src/contracts/plans';
import { allow, currentUser } from '../middleware/auth';
import { createPlan, getPlan, listPlans, planCsv } from '../services/plans';
import type { AppContext } from '../context';

// No PATCH or DELETE: a saved plan is immutable.
export function plansRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('plans.read'), async (req, res) => {
    res.json(PlanList.parse({ plans: await listPlans(s, currentUser(req), PlanQuery.parse(req.query)) }));
  });
  router.post('/', allow('plans.create'), async (req, res) => {
    res.status(201).json(Plan.parse(await createPlan(s, currentUser(req), PlanInputs.parse(req.body))));
  });
  router.get('/:id', allow('plans.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Plan.parse(await getPlan(s, currentUser(req), id)));
  });
  router.get('/:id/export.csv', allow('plans.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const { filename, csv } = await planCsv(s, currentUser(req), id);
    res.type('text/csv').attachment(filename).send(csv);
  });
  return router;
}
