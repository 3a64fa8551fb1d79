import {
  counterSchema,
  farmPath,
  houseCreateSchema,
  housePath,
  houseSchema,
  houseUpdateSchema,
  houseWithCountersSchema,
} from '@tierscope/contracts';
import { z } from 'zod';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { HousesService } from './houses.service';

export function housesRoutes(service: HousesService) {
  return declareRoutes('Houses', [
    route({
      method: 'get',
      path: '/farms/:farmId/houses',
      summary: 'Houses of a farm',
      params: farmPath,
      answer: z.array(houseSchema),
      handle: ({ req, params }) => service.listByFarm(contextOf(req), params.farmId),
    }),
    route({
      method: 'post',
      path: '/farms/:farmId/houses',
      summary: 'Add a house with its sections and counters',
      params: farmPath,
      body: houseCreateSchema,
      status: 201,
      answer: houseWithCountersSchema,
      errors: { 409: 'Name already used' },
      handle: ({ req, params, body }) => service.create(contextOf(req), params.farmId, body),
    }),
    route({
      method: 'get',
      path: '/houses/:houseId',
      summary: 'One house with its counters',
      params: housePath,
      answer: houseWithCountersSchema,
      handle: ({ req, params }) => service.get(contextOf(req), params.houseId),
    }),
    route({
      method: 'get',
      path: '/houses/:houseId/counters',
      summary: "A house's counters",
      params: housePath,
      answer: z.array(counterSchema),
      handle: ({ req, params }) => service.counters(contextOf(req), params.houseId),
    }),
    route({
      method: 'patch',
      path: '/houses/:houseId',
      summary: 'Change house settings',
      params: housePath,
      body: houseUpdateSchema,
      answer: houseWithCountersSchema,
      errors: { 409: 'Layout locked by readings, or name used' },
      handle: ({ req, params, body }) => service.update(contextOf(req), params.houseId, body),
    }),
    route({
      method: 'delete',
      path: '/houses/:houseId',
      summary: 'Delete a house that has no readings',
      params: housePath,
      status: 204,
      errors: { 409: 'The house has readings' },
      handle: ({ req, params }) => service.remove(contextOf(req), params.houseId),
    }),
  ]);
}
