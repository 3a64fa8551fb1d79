import { houseCreateSchema, houseUpdateSchema, idParam } from '@tierscope/contracts';
import { Router } from 'express';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { HousesService } from './houses.service';

export function housesRoutes(service: HousesService): Router {
  const router = Router();
  router.get('/farms/:farmId/houses', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    res.json(await service.listByFarm(contextOf(req), farmId));
  });
  router.post('/farms/:farmId/houses', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    const input = parseInput(houseCreateSchema, req.body);
    res.status(201).json(await service.create(contextOf(req), farmId, input));
  });
  router.get('/houses/:houseId', async (req, res) => {
    res.json(await service.get(contextOf(req), parseInput(idParam, req.params.houseId, 'path')));
  });
  router.get('/houses/:houseId/counters', async (req, res) => {
    res.json(
      await service.counters(contextOf(req), parseInput(idParam, req.params.houseId, 'path')),
    );
  });
  router.patch('/houses/:houseId', async (req, res) => {
    const houseId = parseInput(idParam, req.params.houseId, 'path');
    res.json(
      await service.update(contextOf(req), houseId, parseInput(houseUpdateSchema, req.body)),
    );
  });
  router.delete('/houses/:houseId', async (req, res) => {
    await service.remove(contextOf(req), parseInput(idParam, req.params.houseId, 'path'));
    res.status(204).end();
  });
  return router;
}
