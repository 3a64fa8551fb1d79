import { endpoints } from '@tierscope/contracts';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { FlocksService } from './flocks.service';

export function flocksRoutes(service: FlocksService) {
  return declareRoutes('Flocks', [
    route({
      ...endpoints.flocks.list,
      handle: ({ req, params }) => service.list(contextOf(req), params.houseId),
    }),
    route({
      ...endpoints.flocks.place,
      handle: ({ req, params, body }) => service.place(contextOf(req), params.houseId, body),
    }),
    route({
      ...endpoints.flocks.update,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.flockId, body),
    }),
    route({
      ...endpoints.flocks.recordLoss,
      handle: ({ req, params, body }) =>
        service.recordLoss(contextOf(req), params.flockId, params.day, body),
    }),
    route({
      ...endpoints.flocks.production,
      handle: ({ req, params }) => service.production(contextOf(req), params.flockId),
    }),
  ]);
}
