import { Router } from 'express';
import { IdParam } from './params';
import { Outbox, OutboxMessage } from '../../src/contracts/mail';
import { allow, currentUser } from '../middleware/auth';
import { retryMail, siteOutbox } from '../services/mail';
import type { AppContext } from '../context';

export function mailOutboxRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('mail-outbox.manage'), async (req, res) => {
    res.json(Outbox.parse(await siteOutbox(s.db, currentUser(req))));
  });
  router.post('/:id/retry', allow('mail-outbox.manage'), async (req, res) => {
    const message = await retryMail(s.db, s.clock, currentUser(req), IdParam.parse(req.params).id);
    s.mail?.kick();
    res.json(OutboxMessage.parse(message));
  });
  return router;
}
