import { z } from 'zod';
import { endpoint } from './endpoint';
import { gatewayCreateSchema, gatewayCreatedSchema, gatewaySchema } from './ingest.schema';
import { farmPath, idParam } from './primitives.schema';

export const gatewaysEndpoints = {
  list: endpoint({
    method: 'get',
    path: '/farms/:farmId/gateways',
    summary: "A farm's gateways (administrators and integrators)",
    permission: 'gateways.manage',
    params: farmPath,
    answer: z.array(gatewaySchema),
  }),
  create: endpoint({
    method: 'post',
    path: '/farms/:farmId/gateways',
    summary: 'Add a gateway; the answer holds its key, shown this once',
    permission: 'gateways.manage',
    params: farmPath,
    body: gatewayCreateSchema,
    status: 201,
    answer: gatewayCreatedSchema,
  }),
  revoke: endpoint({
    method: 'post',
    path: '/gateways/:gatewayId/revoke',
    summary: "Revoke a gateway's key",
    permission: 'gateways.manage',
    params: z.object({ gatewayId: idParam }),
    answer: gatewaySchema,
  }),
};
