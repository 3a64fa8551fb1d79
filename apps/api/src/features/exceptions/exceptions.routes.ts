import { endpoints } from '@tierscope/contracts';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { ExceptionsService } from './exceptions.service';

export function exceptionsRoutes(service: ExceptionsService) {
  return declareRoutes('Map and exceptions', [
    route({
      ...endpoints.exceptions.houseMap,
      handle: ({ req, params, query }) => service.map(contextOf(req), params.houseId, query),
    }),
    route({
      ...endpoints.exceptions.cell,
      handle: ({ req, params }) =>
        service.cell(contextOf(req), params.houseId, params.row, params.tier),
    }),
    route({
      ...endpoints.exceptions.list,
      handle: ({ req, query }) => service.list(contextOf(req), query),
    }),
    route({
      ...endpoints.exceptions.acknowledge,
      handle: ({ req, params }) => service.acknowledge(contextOf(req), params.exceptionId),
    }),
    route({
      ...endpoints.exceptions.close,
      handle: ({ req, params, body }) => service.close(contextOf(req), params.exceptionId, body),
    }),
  ]);
}
