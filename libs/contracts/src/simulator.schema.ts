import { z } from 'zod';
import { COUNTER_KINDS } from '@tierscope/domain';

/** What the simulator needs to stand in for one farm's gateway: where to send, its key, and the houses. */
export const simulatorFarmSchema = z.object({
  farm: z.string(),
  apiUrl: z.url(),
  gatewayKey: z.string().min(10),
  houses: z
    .array(
      z.object({
        name: z.string(),
        rows: z.number().int().min(1),
        tiers: z.number().int().min(1),
        timezone: z.string(),
        lightsOn: z.string(),
        photoperiodHours: z.number().min(1).max(24),
        hensHoused: z.number().int().positive(),
        /** The flock's age in weeks at the simulator's start time. */
        flockAgeWeeks: z.number().min(0),
        counters: z.array(
          z.object({
            externalId: z.string(),
            kind: z.enum(COUNTER_KINDS),
            row: z.number().int().nullable(),
            tier: z.number().int().nullable(),
          }),
        ),
      }),
    )
    .min(1),
});
export type SimulatorFarm = z.infer<typeof simulatorFarmSchema>;
export type SimulatorHouse = SimulatorFarm['houses'][number];
