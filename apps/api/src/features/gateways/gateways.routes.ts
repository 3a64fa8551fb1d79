import { gatewayCreateSchema, idParam } from '@tierscope/contracts';
import { Router } from 'express';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { GatewaysService } from './gateways.service';

export function gatewaysRoutes(service: GatewaysService): Router {
  const router = Router();
  router.get('/farms/:farmId/gateways', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    res.json(await service.list(contextOf(req), farmId));
  });
  router.post('/farms/:farmId/gateways', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    const input = parseInput(gatewayCreateSchema, req.body);
    res.status(201).json(await service.create(contextOf(req), farmId, input));
  });
  router.post('/gateways/:gatewayId/revoke', async (req, res) => {
    const gatewayId = parseInput(idParam, req.params.gatewayId, 'path');
    res.json(await service.revoke(contextOf(req), gatewayId));
  });
  return router;
}
