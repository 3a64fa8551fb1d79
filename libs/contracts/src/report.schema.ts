import { EXCEPTION_KINDS } from '@tierscope/domain';
import { z } from 'zod';
import { calendarDay, idParam } from './primitives.schema';
import { exceptionSchema } from './live.schema';

const day = calendarDay('A date such as 2026-11-30');

export const dailyReportQuerySchema = z.object({
  houseId: idParam,
  day,
});
export type DailyReportQuery = z.infer<typeof dailyReportQuerySchema>;

export const dailyReportSchema = z.object({
  houseId: z.number().int(),
  houseName: z.string(),
  farmName: z.string(),
  day: z.string(),
  timezone: z.string(),
  from: z.iso.datetime(),
  to: z.iso.datetime(),
  isComplete: z.boolean(),
  sections: z.array(
    z.object({
      row: z.number().int(),
      tier: z.number().int(),
      eggs: z.number().nullable(),
      expected: z.number().nullable(),
      ratio: z.number().nullable(),
      exceptionKind: z.enum(EXCEPTION_KINDS).nullable(),
      isLearning: z.boolean(),
    }),
  ),
  totals: z.object({
    belts: z.number().int(),
    collector: z.number().int(),
    /** (collector − belts) ÷ belts, % */
    collectorGapPct: z.number().nullable(),
    hensAlive: z.number().int().nullable(),
    henDayPct: z.number().nullable(),
  }),
  exceptions: z.array(exceptionSchema),
});
export type DailyReport = z.infer<typeof dailyReportSchema>;

export const farmSummaryQuerySchema = z
  .object({ farmId: idParam, from: day, to: day })
  .refine((q) => q.from <= q.to, { error: 'from comes before to', path: ['from'] })
  .refine((q) => Date.parse(q.to) - Date.parse(q.from) <= 400 * 86_400_000, {
    error: 'At most 400 days at once',
    path: ['to'],
  });
export type FarmSummaryQuery = z.infer<typeof farmSummaryQuerySchema>;

export const farmSummarySchema = z.object({
  farmId: z.number().int(),
  farmName: z.string(),
  /** ISO 4217 code of the values below (the farm's setting) */
  currency: z.string(),
  from: z.string(),
  to: z.string(),
  houses: z.array(
    z.object({
      houseId: z.number().int(),
      houseName: z.string(),
      eggs: z.number().int(),
      collector: z.number().int(),
      henDays: z.number().int(),
      henDayPct: z.number().nullable(),
      exceptionsOpened: z.number().int(),
      eggsLost: z.number().int(),
      eggsLostValue: z.number().nullable(),
      days: z.array(
        z.object({ day: z.string(), eggs: z.number().int(), henDayPct: z.number().nullable() }),
      ),
    }),
  ),
  totals: z.object({
    eggs: z.number().int(),
    henDayPct: z.number().nullable(),
    exceptionsOpened: z.number().int(),
    eggsLost: z.number().int(),
    eggsLostValue: z.number().nullable(),
  }),
});
export type FarmSummary = z.infer<typeof farmSummarySchema>;
