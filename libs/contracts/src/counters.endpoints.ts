import { z } from 'zod';
import { endpoint } from './endpoint';
import {
  counterPlacedSchema,
  counterPlacementSchema,
  unknownCounterSchema,
} from './counter.schema';
import { farmPath, idParam } from './primitives.schema';

const unknownCounterPath = z.object({ counterId: idParam });

export const countersEndpoints = {
  unknown: endpoint({
    method: 'get',
    path: '/farms/:farmId/unknown-counters',
    summary: "Counter ids the farm's gateways sent that no house has yet, with their held readings",
    permission: 'counters.manage',
    params: farmPath,
    answer: z.array(unknownCounterSchema),
  }),
  place: endpoint({
    method: 'post',
    path: '/unknown-counters/:counterId/place',
    summary:
      "Place an unknown counter on a house's belt (row and tier) or collector; its held readings are counted there and the days they touch are judged again",
    permission: 'counters.manage',
    params: unknownCounterPath,
    body: counterPlacementSchema,
    answer: counterPlacedSchema,
    errors: {
      409: 'Already placed, or the counter at that place counted during the same hours',
    },
  }),
  forget: endpoint({
    method: 'delete',
    path: '/unknown-counters/:counterId',
    summary: 'Forget an unknown counter and its held readings (a mistyped or test id)',
    permission: 'counters.manage',
    params: unknownCounterPath,
    status: 204,
    errors: { 409: 'Already placed' },
  }),
};
