import { Router } from 'express';
import { IdParam } from './params';
import { PasswordResetSent, SendPasswordReset } from '../../src/contracts/session';
import { UpdateUser, User, UserList } from '../../src/contracts/users';
import { allow, currentUser } from '../middleware/auth';
import { sendPasswordReset } from '../services/passwords';
import { changeUser, listUsers } from '../services/users';
import type { AppContext } from '../context';

export function usersRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('people.manage'), async (req, res) => {
    res.json(UserList.parse({ users: await listUsers(s, currentUser(req)) }));
  });
  router.patch('/:id', allow('people.manage'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(User.parse(await changeUser(s, currentUser(req), id, UpdateUser.parse(req.body))));
  });
  router.post('/:id/password-reset', allow('people.manage'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    SendPasswordReset.parse(req.body);
    res.status(201).json(PasswordResetSent.parse(await sendPasswordReset(s, currentUser(req), id)));
  });
  return router;
}
