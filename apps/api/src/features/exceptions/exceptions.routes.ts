import {
  closeExceptionSchema,
  exceptionsQuerySchema,
  idParam,
  mapQuerySchema,
} from '@tierscope/contracts';
import { Router } from 'express';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { ExceptionsService } from './exceptions.service';

export function exceptionsRoutes(service: ExceptionsService): Router {
  const router = Router();
  router.get('/houses/:houseId/map', async (req, res) => {
    const houseId = parseInput(idParam, req.params.houseId, 'path');
    res.json(
      await service.map(contextOf(req), houseId, parseInput(mapQuerySchema, req.query, 'query')),
    );
  });
  router.get('/houses/:houseId/cells/:row/:tier', async (req, res) => {
    const houseId = parseInput(idParam, req.params.houseId, 'path');
    const row = parseInput(idParam, req.params.row, 'path');
    const tier = parseInput(idParam, req.params.tier, 'path');
    res.json(await service.cell(contextOf(req), houseId, row, tier));
  });
  router.get('/exceptions', async (req, res) => {
    res.json(
      await service.list(contextOf(req), parseInput(exceptionsQuerySchema, req.query, 'query')),
    );
  });
  router.post('/exceptions/:exceptionId/acknowledge', async (req, res) => {
    const id = parseInput(idParam, req.params.exceptionId, 'path');
    res.json(await service.acknowledge(contextOf(req), id));
  });
  router.post('/exceptions/:exceptionId/close', async (req, res) => {
    const id = parseInput(idParam, req.params.exceptionId, 'path');
    res.json(await service.close(contextOf(req), id, parseInput(closeExceptionSchema, req.body)));
  });
  return router;
}
