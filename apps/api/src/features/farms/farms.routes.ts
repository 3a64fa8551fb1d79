import { farmCreateSchema, farmPath, farmSchema, farmUpdateSchema } from '@tierscope/contracts';
import { z } from 'zod';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { FarmsService } from './farms.service';

export function farmsRoutes(service: FarmsService) {
  return declareRoutes('Farms', [
    route({
      method: 'get',
      path: '/farms',
      summary: 'Farms you belong to',
      answer: z.array(farmSchema),
      handle: ({ req }) => service.list(contextOf(req)),
    }),
    route({
      method: 'post',
      path: '/farms',
      summary: 'Add a farm (administrators)',
      body: farmCreateSchema,
      status: 201,
      answer: farmSchema,
      handle: ({ req, body }) => service.create(contextOf(req), body),
    }),
    route({
      method: 'get',
      path: '/farms/:farmId',
      summary: 'One farm',
      params: farmPath,
      answer: farmSchema,
      handle: ({ req, params }) => service.get(contextOf(req), params.farmId),
    }),
    route({
      method: 'patch',
      path: '/farms/:farmId',
      summary: 'Rename a farm',
      params: farmPath,
      body: farmUpdateSchema,
      answer: farmSchema,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.farmId, body),
    }),
  ]);
}
