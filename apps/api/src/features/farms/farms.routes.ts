import { endpoints } from '@tierscope/contracts';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { FarmsService } from './farms.service';

export function farmsRoutes(service: FarmsService) {
  return declareRoutes('Farms', [
    route({
      ...endpoints.farms.list,
      handle: ({ req }) => service.list(contextOf(req)),
    }),
    route({
      ...endpoints.farms.create,
      handle: ({ req, body }) => service.create(contextOf(req), body),
    }),
    route({
      ...endpoints.farms.get,
      handle: ({ req, params }) => service.get(contextOf(req), params.farmId),
    }),
    route({
      ...endpoints.farms.update,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.farmId, body),
    }),
  ]);
}
