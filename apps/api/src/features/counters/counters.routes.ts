import { endpoints } from '@tierscope/contracts';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { CountersService } from './counters.service';

export function countersRoutes(service: CountersService) {
  return declareRoutes('Counters', [
    route({
      ...endpoints.counters.unknown,
      handle: ({ req, params }) => service.unknown(contextOf(req), params.farmId),
    }),
    route({
      ...endpoints.counters.place,
      handle: ({ req, params, body }) => service.place(contextOf(req), params.counterId, body),
    }),
    route({
      ...endpoints.counters.forget,
      handle: ({ req, params }) => service.forget(contextOf(req), params.counterId),
    }),
  ]);
}
