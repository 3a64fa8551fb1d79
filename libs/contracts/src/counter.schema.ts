import { COUNTER_KINDS } from '@tierscope/domain';
import { z } from 'zod';
import { counterSchema } from './house.schema';
import { dbId } from './primitives.schema';

/**
 * A counter id a gateway sent that no house has yet: its readings are held (stored, not counted in any house)
 * until an integrator places it.
 */
export const unknownCounterSchema = z.object({
  id: z.number().int(),
  externalId: z.string(),
  /** when a gateway first named it */
  firstSeenAt: z.iso.datetime(),
  /** its held readings: how many, their eggs, the first and last (null when none are kept) */
  readings: z.number().int(),
  eggs: z.number().int(),
  firstReadingAt: z.iso.datetime().nullable(),
  lastReadingAt: z.iso.datetime().nullable(),
});
export type UnknownCounter = z.infer<typeof unknownCounterSchema>;

const place = z.number('Choose a number').int('Choose a whole number').min(1, 'At least 1');

/** Where an unknown counter goes: a belt of one row and tier, or the house's collector. */
export const counterPlacementSchema = z
  .object({
    houseId: dbId,
    kind: z.enum(COUNTER_KINDS, 'Choose a belt or the collector'),
    row: place.optional(),
    tier: place.optional(),
  })
  .superRefine((value, ctx) => {
    if (value.kind === 'belt') {
      for (const key of ['row', 'tier'] as const) {
        if (value[key] === undefined)
          ctx.addIssue({ code: 'custom', path: [key], message: `Choose the belt's ${key}` });
      }
    } else {
      for (const key of ['row', 'tier'] as const) {
        if (value[key] !== undefined)
          ctx.addIssue({
            code: 'custom',
            path: [key],
            message: `The collector counts the whole house: leave out the ${key}`,
          });
      }
    }
  });
export type CounterPlacement = z.infer<typeof counterPlacementSchema>;

/** The answer to placing a counter: where it now counts and what its held readings brought. */
export const counterPlacedSchema = z.object({
  counter: counterSchema,
  houseId: z.number().int(),
  /** the counter that had this place before, kept (inactive) for the days it counted; null when none had */
  replacedExternalId: z.string().nullable(),
  readings: z.number().int(),
  eggs: z.number().int(),
  /** the house's production days the held readings fall on (its days are judged again) */
  firstDay: z.iso.date().nullable(),
  lastDay: z.iso.date().nullable(),
});
export type CounterPlaced = z.infer<typeof counterPlacedSchema>;
