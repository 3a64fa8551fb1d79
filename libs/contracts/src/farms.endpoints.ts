import { z } from 'zod';
import { endpoint } from './endpoint';
import { farmCreateSchema, farmSchema, farmUpdateSchema } from './farm.schema';
import { farmPath } from './primitives.schema';

export const farmsEndpoints = {
  list: endpoint({
    method: 'get',
    path: '/farms',
    summary: 'Farms you belong to',
    answer: z.array(farmSchema),
  }),
  create: endpoint({
    method: 'post',
    path: '/farms',
    summary: 'Add a farm (administrators)',
    permission: 'users.manage',
    body: farmCreateSchema,
    status: 201,
    answer: farmSchema,
  }),
  get: endpoint({
    method: 'get',
    path: '/farms/:farmId',
    summary: 'One farm',
    permission: 'farm.read',
    params: farmPath,
    answer: farmSchema,
  }),
  update: endpoint({
    method: 'patch',
    path: '/farms/:farmId',
    summary: 'Rename a farm',
    permission: 'farm.update',
    params: farmPath,
    body: farmUpdateSchema,
    answer: farmSchema,
  }),
};
