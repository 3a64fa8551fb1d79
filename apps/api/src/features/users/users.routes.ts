import { idParam, userCreateSchema, userUpdateSchema } from '@tierscope/contracts';
import { Router } from 'express';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { UsersService } from './users.service';

export function usersRoutes(service: UsersService): Router {
  const router = Router();
  router.get('/users', async (req, res) => {
    res.json(await service.list(contextOf(req)));
  });
  router.post('/users', async (req, res) => {
    res
      .status(201)
      .json(await service.create(contextOf(req), parseInput(userCreateSchema, req.body)));
  });
  router.patch('/users/:userId', async (req, res) => {
    const id = parseInput(idParam, req.params.userId, 'path');
    res.json(await service.update(contextOf(req), id, parseInput(userUpdateSchema, req.body)));
  });
  return router;
}
