import {
  cellDetailSchema,
  closeExceptionSchema,
  exceptionSchema,
  exceptionsQuerySchema,
  houseMapSchema,
  idParam,
  mapQuerySchema,
} from '@tierscope/contracts';
import { z } from 'zod';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { ExceptionsService } from './exceptions.service';

const exceptionParams = z.object({ exceptionId: idParam });

export function exceptionsRoutes(service: ExceptionsService) {
  return declareRoutes('Map and exceptions', [
    route({
      method: 'get',
      path: '/houses/:houseId/map',
      summary: 'The rows × tiers map of a house for a window',
      params: z.object({ houseId: idParam }),
      query: mapQuerySchema,
      answer: houseMapSchema,
      handle: ({ req, params, query }) => service.map(contextOf(req), params.houseId, query),
    }),
    route({
      method: 'get',
      path: '/houses/:houseId/cells/:row/:tier',
      summary: 'One section of a house: today, the last days against expected, its exception',
      params: z.object({ houseId: idParam, row: idParam, tier: idParam }),
      answer: cellDetailSchema,
      handle: ({ req, params }) =>
        service.cell(contextOf(req), params.houseId, params.row, params.tier),
    }),
    route({
      method: 'get',
      path: '/exceptions',
      summary: 'Exceptions on your farms, newest first',
      query: exceptionsQuerySchema,
      answer: z.array(exceptionSchema),
      handle: ({ req, query }) => service.list(contextOf(req), query),
    }),
    route({
      method: 'post',
      path: '/exceptions/:exceptionId/acknowledge',
      summary: 'Acknowledge an exception (someone is on it)',
      params: exceptionParams,
      answer: exceptionSchema,
      handle: ({ req, params }) => service.acknowledge(contextOf(req), params.exceptionId),
    }),
    route({
      method: 'post',
      path: '/exceptions/:exceptionId/close',
      summary: 'Close an exception with a reason',
      params: exceptionParams,
      body: closeExceptionSchema,
      answer: exceptionSchema,
      handle: ({ req, params, body }) => service.close(contextOf(req), params.exceptionId, body),
    }),
  ]);
}
