import {
  calendarDay,
  flockCreateSchema,
  flockProductionSchema,
  flockSchema,
  flockUpdateSchema,
  idParam,
  mortalityEntrySchema,
} from '@tierscope/contracts';
import { z } from 'zod';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { FlocksService } from './flocks.service';

const houseParams = z.object({ houseId: idParam });
const flockParams = z.object({ flockId: idParam });

export function flocksRoutes(service: FlocksService) {
  return declareRoutes('Flocks', [
    route({
      method: 'get',
      path: '/houses/:houseId/flocks',
      summary: "A house's flocks, newest first",
      params: houseParams,
      answer: z.array(flockSchema),
      handle: ({ req, params }) => service.list(contextOf(req), params.houseId),
    }),
    route({
      method: 'post',
      path: '/houses/:houseId/flocks',
      summary: 'Place a flock (managers and admins; one flock in a house at a time)',
      params: houseParams,
      body: flockCreateSchema,
      status: 201,
      answer: flockSchema,
      errors: { 409: 'The house has a flock' },
      handle: ({ req, params, body }) => service.place(contextOf(req), params.houseId, body),
    }),
    route({
      method: 'patch',
      path: '/flocks/:flockId',
      summary: 'Correct a flock or end it (endedOn)',
      params: flockParams,
      body: flockUpdateSchema,
      answer: flockSchema,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.flockId, body),
    }),
    route({
      method: 'put',
      path: '/flocks/:flockId/mortality/:day',
      summary: "The morning walk: a day's dead and culled hens (replaces that day's entry)",
      params: flockParams.extend({ day: calendarDay('A date such as 2026-11-01') }),
      body: mortalityEntrySchema,
      answer: flockSchema,
      handle: ({ req, params, body }) =>
        service.recordLoss(contextOf(req), params.flockId, params.day, body),
    }),
    route({
      method: 'get',
      path: '/flocks/:flockId/production',
      summary:
        'Hen-day production by day and by week of age, hen-housed production, eggs per hen housed, mortality, livability and the fitted lay curve',
      params: flockParams,
      answer: flockProductionSchema,
      handle: ({ req, params }) => service.production(contextOf(req), params.flockId),
    }),
  ]);
}
