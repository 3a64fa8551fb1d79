import { endpoints } from '@tierscope/contracts';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { GatewaysService } from './gateways.service';

export function gatewaysRoutes(service: GatewaysService) {
  return declareRoutes('Gateways', [
    route({
      ...endpoints.gateways.list,
      handle: ({ req, params }) => service.list(contextOf(req), params.farmId),
    }),
    route({
      ...endpoints.gateways.create,
      handle: ({ req, params, body }) => service.create(contextOf(req), params.farmId, body),
    }),
    route({
      ...endpoints.gateways.revoke,
      handle: ({ req, params }) => service.revoke(contextOf(req), params.gatewayId),
    }),
  ]);
}
