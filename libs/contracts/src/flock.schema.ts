import { z } from 'zod';
import { calendarDay } from './primitives.schema';

const day = calendarDay('A date such as 2026-11-01');

export const flockCreateSchema = z.object({
  placedOn: day,
  hensHoused: z.number().int().min(1, 'At least one hen').max(1_000_000),
  ageAtPlacementWeeks: z.number().int().min(0).max(120),
  breed: z.string().trim().max(120).default(''),
  /** hens per section when counted; otherwise they are taken as spread evenly */
  birdsPerSection: z
    .array(
      z.object({
        row: z.number().int().min(1),
        tier: z.number().int().min(1),
        birds: z.number().int().min(0).max(200_000),
      }),
    )
    .max(2000)
    .optional(),
});
export type FlockCreate = z.input<typeof flockCreateSchema>;

export const flockUpdateSchema = z
  .object({
    endedOn: day.nullable(),
    breed: z.string().trim().max(120),
    hensHoused: z.number().int().min(1).max(1_000_000),
    ageAtPlacementWeeks: z.number().int().min(0).max(120),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change');
export type FlockUpdate = z.infer<typeof flockUpdateSchema>;

export const mortalityEntrySchema = z.object({
  dead: z.number().int().min(0, 'Not negative').max(100_000),
  culled: z.number().int().min(0, 'Not negative').max(100_000),
});
export type MortalityEntry = z.infer<typeof mortalityEntrySchema>;

export const flockSchema = z.object({
  id: z.number().int(),
  houseId: z.number().int(),
  placedOn: z.string(),
  hensHoused: z.number().int(),
  ageAtPlacementWeeks: z.number().int(),
  breed: z.string(),
  endedOn: z.string().nullable(),
  hensAlive: z.number().int(),
  lost: z.number().int(),
});
export type Flock = z.infer<typeof flockSchema>;

export const flockProductionSchema = z.object({
  flock: flockSchema,
  houseName: z.string(),
  timezone: z.string(),
  days: z.array(
    z.object({
      day: z.string(),
      ageWeeks: z.number().int(),
      eggs: z.number().int().nullable(),
      collector: z.number().int().nullable(),
      hensAlive: z.number().int(),
      dead: z.number().int(),
      culled: z.number().int(),
      henDayPct: z.number().nullable(),
      /** whether the day's morning walk (dead and culled) was recorded: 0 dead is a count, not a default */
      isWalkRecorded: z.boolean(),
    }),
  ),
  weeks: z.array(
    z.object({
      ageWeeks: z.number().int(),
      firstDay: z.string(),
      days: z.number().int(),
      eggs: z.number().int(),
      henDays: z.number().int(),
      henDayPct: z.number().nullable(),
      dead: z.number().int(),
      culled: z.number().int(),
      mortalityPct: z.number().nullable(),
      fittedPct: z.number().nullable(),
    }),
  ),
  totals: z.object({
    eggs: z.number().int(),
    days: z.number().int(),
    henDayPct: z.number().nullable(),
    henHousedPct: z.number().nullable(),
    eggsPerHenHoused: z.number().nullable(),
    cumulativeMortalityPct: z.number().nullable(),
    livabilityPct: z.number().nullable(),
  }),
  fit: z
    .object({
      model: z.literal('compartmental'),
      params: z.object({ a: z.number(), b: z.number(), c: z.number(), d: z.number() }),
      r2: z.number().nullable(),
      weeks: z.number().int(),
      isGoodEnough: z.boolean(),
    })
    .nullable(),
});
export type FlockProduction = z.infer<typeof flockProductionSchema>;
