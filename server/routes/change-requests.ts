import { Router } from 'express';
import rateLimit from 'express-rate-limit';
import { IdParam } from './params';
import { ChangeRequestDetail, ChangeRequestInput, ChangeRequestList, ChangeRequestQuery, SignatureInput } from '../../src/contracts/change-requests';
import { HttpError } from '../http-error';
import { allow, currentUser } from '../middleware/auth';
import { changeRequestCsv, getChangeRequest, listChangeRequests, proposeChange, signChange } from '../services/change-requests';
import type { AppContext } from '../context';

export function changeRequestsRouter(opts: AppContext): Router {
  const router = Router();
  // Password guessing through the signature dialog is held to the sign-in's per-account budget;
  // only wrong passwords count against it.
  const signLimit = rateLimit({
    windowMs: opts.signInLimit.windowMs,
    limit: opts.signInLimit.perAccount,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `signer:${req.user?.id ?? 'none'}`,
    skipSuccessfulRequests: true,
    requestWasSuccessful: (_req, res) => res.locals.wrongPassword !== true,
    message: { error: { code: 'rate_limited', message: 'Too many wrong passwords; wait a few minutes and try again' } },
  });

  router.get('/', allow('change-requests.read'), async (req, res) => {
    res.json(ChangeRequestList.parse({ changeRequests: await listChangeRequests(opts, currentUser(req), ChangeRequestQuery.parse(req.query)) }));
  });
  router.post('/', allow('change-requests.propose'), async (req, res) => {
    res.status(201).json(ChangeRequestDetail.parse(await proposeChange(opts, currentUser(req), ChangeRequestInput.parse(req.body))));
  });
  router.get('/:id', allow('change-requests.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(ChangeRequestDetail.parse(await getChangeRequest(opts, currentUser(req), id)));
  });
  router.get('/:id/export.csv', allow('change-requests.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const { filename, csv } = await changeRequestCsv(opts, currentUser(req), id);
    res.type('text/csv').attachment(filename).send(csv);
  });
  router.post('/:id/signatures', allow('change-requests.sign'), signLimit, async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const body = SignatureInput.parse(req.body);
    try {
      res.status(201).json(ChangeRequestDetail.parse(await signChange(opts, currentUser(req), id, body)));
    } catch (e) {
      if (e instanceof HttpError && e.code === 'wrong_password') res.locals.wrongPassword = true;
      throw e;
    }
  });
  return router;
}
