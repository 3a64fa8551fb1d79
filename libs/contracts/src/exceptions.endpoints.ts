import { z } from 'zod';
import { endpoint } from './endpoint';
import {
  cellDetailSchema,
  closeExceptionSchema,
  exceptionSchema,
  exceptionsQuerySchema,
  houseMapSchema,
  mapQuerySchema,
} from './live.schema';
import { idParam } from './primitives.schema';

const exceptionParams = z.object({ exceptionId: idParam });

export const exceptionsEndpoints = {
  houseMap: endpoint({
    method: 'get',
    path: '/houses/:houseId/map',
    summary: 'The rows × tiers map of a house for a window',
    permission: 'farm.read',
    params: z.object({ houseId: idParam }),
    query: mapQuerySchema,
    answer: houseMapSchema,
  }),
  cell: endpoint({
    method: 'get',
    path: '/houses/:houseId/cells/:row/:tier',
    summary: 'One section of a house: today, the last days against expected, its exception',
    permission: 'farm.read',
    params: z.object({ houseId: idParam, row: idParam, tier: idParam }),
    answer: cellDetailSchema,
  }),
  list: endpoint({
    method: 'get',
    path: '/exceptions',
    summary: 'Exceptions on your farms, newest first',
    permission: 'farm.read',
    query: exceptionsQuerySchema,
    answer: z.array(exceptionSchema),
  }),
  acknowledge: endpoint({
    method: 'post',
    path: '/exceptions/:exceptionId/acknowledge',
    summary: 'Acknowledge an exception (someone is on it)',
    permission: 'exceptions.acknowledge',
    params: exceptionParams,
    answer: exceptionSchema,
  }),
  close: endpoint({
    method: 'post',
    path: '/exceptions/:exceptionId/close',
    summary: 'Close an exception with a reason',
    permission: 'exceptions.acknowledge',
    params: exceptionParams,
    body: closeExceptionSchema,
    answer: exceptionSchema,
  }),
};
