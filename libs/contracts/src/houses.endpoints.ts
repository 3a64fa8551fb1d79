import { z } from 'zod';
import { endpoint } from './endpoint';
import {
  counterSchema,
  houseCreateSchema,
  houseSchema,
  houseUpdateSchema,
  houseWithCountersSchema,
} from './house.schema';
import { farmPath, housePath } from './primitives.schema';

export const housesEndpoints = {
  listByFarm: endpoint({
    method: 'get',
    path: '/farms/:farmId/houses',
    summary: 'Houses of a farm',
    permission: 'farm.read',
    params: farmPath,
    answer: z.array(houseSchema),
  }),
  create: endpoint({
    method: 'post',
    path: '/farms/:farmId/houses',
    summary: 'Add a house with its sections and counters',
    permission: 'house.create',
    params: farmPath,
    body: houseCreateSchema,
    status: 201,
    answer: houseWithCountersSchema,
    errors: { 409: 'Name already used' },
  }),
  get: endpoint({
    method: 'get',
    path: '/houses/:houseId',
    summary: 'One house with its counters',
    permission: 'farm.read',
    params: housePath,
    answer: houseWithCountersSchema,
  }),
  counters: endpoint({
    method: 'get',
    path: '/houses/:houseId/counters',
    summary: "A house's counters",
    permission: 'farm.read',
    params: housePath,
    answer: z.array(counterSchema),
  }),
  update: endpoint({
    method: 'patch',
    path: '/houses/:houseId',
    summary: 'Change house settings',
    permission: 'house.update',
    params: housePath,
    body: houseUpdateSchema,
    answer: houseWithCountersSchema,
    errors: { 409: 'Layout locked by readings, or name used' },
  }),
  remove: endpoint({
    method: 'delete',
    path: '/houses/:houseId',
    summary: 'Delete a house that has no readings',
    permission: 'house.delete',
    params: housePath,
    status: 204,
    errors: { 409: 'The house has readings' },
  }),
};
