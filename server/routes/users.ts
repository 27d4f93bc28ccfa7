import { Router } from 'express';
import { z } from 'zod';
import { UpdateUser, User, UserList } from '../../src/contracts/users';
import { allow, currentUser } from '../middleware/auth';
import { changeUser, listUsers } from '../services/users';
import type { Services } from './services';

const IdParam = z.object({ id: z.coerce.number().int().positive() });

export function usersRouter(s: Services): Router {
  const router = Router();
  router.get('/', allow('admin'), (req, res) => {
    res.json(UserList.parse({ users: listUsers(s, currentUser(req)) }));
  });
  router.patch('/:id', allow('admin'), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(User.parse(changeUser(s, currentUser(req), id, UpdateUser.parse(req.body))));
  });
  return router;
}
