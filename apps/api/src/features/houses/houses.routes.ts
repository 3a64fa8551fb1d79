import { endpoints } from '@tierscope/contracts';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { HousesService } from './houses.service';

export function housesRoutes(service: HousesService) {
  return declareRoutes('Houses', [
    route({
      ...endpoints.houses.listByFarm,
      handle: ({ req, params }) => service.listByFarm(contextOf(req), params.farmId),
    }),
    route({
      ...endpoints.houses.create,
      handle: ({ req, params, body }) => service.create(contextOf(req), params.farmId, body),
    }),
    route({
      ...endpoints.houses.get,
      handle: ({ req, params }) => service.get(contextOf(req), params.houseId),
    }),
    route({
      ...endpoints.houses.counters,
      handle: ({ req, params }) => service.counters(contextOf(req), params.houseId),
    }),
    route({
      ...endpoints.houses.update,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.houseId, body),
    }),
    route({
      ...endpoints.houses.remove,
      handle: ({ req, params }) => service.remove(contextOf(req), params.houseId),
    }),
  ]);
}
