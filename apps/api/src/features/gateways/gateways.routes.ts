import {
  farmPath,
  gatewayCreateSchema,
  gatewayCreatedSchema,
  gatewaySchema,
  idParam,
} from '@tierscope/contracts';
import { z } from 'zod';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { GatewaysService } from './gateways.service';

export function gatewaysRoutes(service: GatewaysService) {
  return declareRoutes('Gateways', [
    route({
      method: 'get',
      path: '/farms/:farmId/gateways',
      summary: "A farm's gateways (administrators and integrators)",
      params: farmPath,
      answer: z.array(gatewaySchema),
      handle: ({ req, params }) => service.list(contextOf(req), params.farmId),
    }),
    route({
      method: 'post',
      path: '/farms/:farmId/gateways',
      summary: 'Add a gateway; the answer holds its key, shown this once',
      params: farmPath,
      body: gatewayCreateSchema,
      status: 201,
      answer: gatewayCreatedSchema,
      handle: ({ req, params, body }) => service.create(contextOf(req), params.farmId, body),
    }),
    route({
      method: 'post',
      path: '/gateways/:gatewayId/revoke',
      summary: "Revoke a gateway's key",
      params: z.object({ gatewayId: idParam }),
      answer: gatewaySchema,
      handle: ({ req, params }) => service.revoke(contextOf(req), params.gatewayId),
    }),
  ]);
}
