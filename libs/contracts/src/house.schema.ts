import {
  CLOCK_TIME_PATTERN,
  COUNTER_KINDS,
  isKnownTimeZone,
  MAX_ROWS,
  MAX_TIERS,
} from '@tierscope/domain';
import { z } from 'zod';

export const counterSchema = z.object({
  id: z.number().int(),
  externalId: z.string(),
  kind: z.enum(COUNTER_KINDS),
  row: z.number().int().nullable(),
  tier: z.number().int().nullable(),
  active: z.boolean(),
});
export type Counter = z.infer<typeof counterSchema>;

const houseFields = {
  name: z.string().trim().min(1, 'Give the house a name').max(80),
  rows: z
    .number('Rows must be a number')
    .int('Rows must be a whole number')
    .min(1, 'A house has at least 1 row')
    .max(MAX_ROWS, `At most ${MAX_ROWS} rows`),
  tiers: z
    .number('Tiers must be a number')
    .int('Tiers must be a whole number')
    .min(1, 'A house has at least 1 tier')
    .max(MAX_TIERS, `At most ${MAX_TIERS} tiers`),
  timezone: z
    .string()
    .refine(isKnownTimeZone, 'Choose a time zone such as America/Chicago or Europe/Amsterdam'),
  lightsOn: z.string().regex(CLOCK_TIME_PATTERN, 'Lights-on is a 24-hour time such as 04:00'),
  photoperiodHours: z
    .number('Photoperiod must be a number of hours')
    .min(1, 'At least 1 hour of light')
    .max(24, 'At most 24 hours of light'),
  shortfallThresholdPct: z
    .number('Threshold must be a percentage')
    .min(1, 'At least 1 %')
    .max(50, 'At most 50 %'),
};

/** Price of a dozen eggs, for the money value of eggs lost; null when not set. */
const eggPricePerDozen = z
  .number('The price must be a number')
  .min(0, 'The price cannot be negative')
  .max(100, 'At most 100 a dozen')
  .nullable();

export const houseCreateSchema = z.object({
  ...houseFields,
  shortfallThresholdPct: houseFields.shortfallThresholdPct.default(10),
  eggPricePerDozen: eggPricePerDozen.default(null),
});
export type HouseCreate = z.input<typeof houseCreateSchema>;

export const houseUpdateSchema = z
  .object({ ...houseFields, eggPricePerDozen })
  .partial()
  .refine((value) => Object.keys(value).length > 0, 'Send at least one field to change');
export type HouseUpdate = z.infer<typeof houseUpdateSchema>;

export const houseSchema = z.object({
  id: z.number().int(),
  farmId: z.number().int(),
  name: z.string(),
  rows: z.number().int(),
  tiers: z.number().int(),
  timezone: z.string(),
  lightsOn: z.string(),
  photoperiodHours: z.number(),
  shortfallThresholdPct: z.number(),
  eggPricePerDozen: z.number().nullable(),
  createdAt: z.iso.datetime(),
});
export type House = z.infer<typeof houseSchema>;

export const houseWithCountersSchema = houseSchema.extend({ counters: z.array(counterSchema) });
export type HouseWithCounters = z.infer<typeof houseWithCountersSchema>;
