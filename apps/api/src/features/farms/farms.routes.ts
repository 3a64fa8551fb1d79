import { farmCreateSchema, farmUpdateSchema, idParam } from '@tierscope/contracts';
import { Router } from 'express';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { FarmsService } from './farms.service';

export function farmsRoutes(service: FarmsService): Router {
  const router = Router();
  router.get('/farms', async (req, res) => {
    res.json(await service.list(contextOf(req)));
  });
  router.post('/farms', async (req, res) => {
    res
      .status(201)
      .json(await service.create(contextOf(req), parseInput(farmCreateSchema, req.body)));
  });
  router.get('/farms/:farmId', async (req, res) => {
    res.json(await service.get(contextOf(req), parseInput(idParam, req.params.farmId, 'path')));
  });
  router.patch('/farms/:farmId', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    res.json(await service.update(contextOf(req), farmId, parseInput(farmUpdateSchema, req.body)));
  });
  return router;
}
