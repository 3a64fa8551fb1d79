import { z } from 'zod';
import { endpoint } from './endpoint';
import {
  flockCreateSchema,
  flockProductionSchema,
  flockSchema,
  flockUpdateSchema,
  mortalityEntrySchema,
} from './flock.schema';
import { calendarDay, idParam } from './primitives.schema';

const houseParams = z.object({ houseId: idParam });
const flockParams = z.object({ flockId: idParam });

export const flocksEndpoints = {
  list: endpoint({
    method: 'get',
    path: '/houses/:houseId/flocks',
    summary: "A house's flocks, newest first",
    permission: 'farm.read',
    params: houseParams,
    answer: z.array(flockSchema),
  }),
  place: endpoint({
    method: 'post',
    path: '/houses/:houseId/flocks',
    summary: 'Place a flock (managers and admins; one flock in a house at a time)',
    permission: 'flock.manage',
    params: houseParams,
    body: flockCreateSchema,
    status: 201,
    answer: flockSchema,
    errors: { 409: 'The house has a flock' },
  }),
  update: endpoint({
    method: 'patch',
    path: '/flocks/:flockId',
    summary: 'Correct a flock or end it (endedOn)',
    permission: 'flock.manage',
    params: flockParams,
    body: flockUpdateSchema,
    answer: flockSchema,
  }),
  recordLoss: endpoint({
    method: 'put',
    path: '/flocks/:flockId/mortality/:day',
    summary: "The morning walk: a day's dead and culled hens (replaces that day's entry)",
    permission: 'flock.manage',
    params: flockParams.extend({ day: calendarDay('A date such as 2026-11-01') }),
    body: mortalityEntrySchema,
    answer: flockSchema,
  }),
  production: endpoint({
    method: 'get',
    path: '/flocks/:flockId/production',
    summary:
      'Hen-day production by day and by week of age, hen-housed production, eggs per hen housed, mortality, livability and the fitted lay curve',
    permission: 'farm.read',
    params: flockParams,
    answer: flockProductionSchema,
  }),
};
