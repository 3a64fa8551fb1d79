import {
  flockCreateSchema,
  flockUpdateSchema,
  calendarDay,
  idParam,
  mortalityEntrySchema,
} from '@tierscope/contracts';
import { Router } from 'express';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { FlocksService } from './flocks.service';

const dayParam = calendarDay('A date such as 2026-11-01');

export function flocksRoutes(service: FlocksService): Router {
  const router = Router();
  router.get('/houses/:houseId/flocks', async (req, res) => {
    const houseId = parseInput(idParam, req.params.houseId, 'path');
    res.json(await service.list(contextOf(req), houseId));
  });
  router.post('/houses/:houseId/flocks', async (req, res) => {
    const houseId = parseInput(idParam, req.params.houseId, 'path');
    res
      .status(201)
      .json(await service.place(contextOf(req), houseId, parseInput(flockCreateSchema, req.body)));
  });
  router.patch('/flocks/:flockId', async (req, res) => {
    const id = parseInput(idParam, req.params.flockId, 'path');
    res.json(await service.update(contextOf(req), id, parseInput(flockUpdateSchema, req.body)));
  });
  router.put('/flocks/:flockId/mortality/:day', async (req, res) => {
    const id = parseInput(idParam, req.params.flockId, 'path');
    const day = parseInput(dayParam, req.params.day, 'path');
    res.json(
      await service.recordLoss(contextOf(req), id, day, parseInput(mortalityEntrySchema, req.body)),
    );
  });
  router.get('/flocks/:flockId/production', async (req, res) => {
    const id = parseInput(idParam, req.params.flockId, 'path');
    res.json(await service.production(contextOf(req), id));
  });
  return router;
}
