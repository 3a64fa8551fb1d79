import { z } from 'zod';
import { instant, safeText } from './primitives.schema';

/** The most readings one batch may carry; a larger batch is answered 413. */
export const MAX_READINGS_PER_BATCH = 10_000;
/** Gateway clocks drift; a reading further ahead than this is refused. */
export const MAX_FUTURE_SKEW_MS = 5 * 60 * 1000;
/** No belt counts this many eggs between two readings; a larger number is a garbled message. */
export const MAX_EGGS_PER_READING = 1_000_000;

/** One reading as a gateway sends it: `eggs` since the previous reading, or the counter's running `total`. */
export const readingInputSchema = z
  .object({
    counter: safeText().trim().min(1, 'counter is empty').max(100, 'counter id is too long'),
    ts: instant('ts must be an ISO-8601 time with an offset'),
    eggs: z
      .number('eggs must be a number')
      .int('eggs must be a whole number')
      .min(0, 'eggs must not be negative')
      .max(MAX_EGGS_PER_READING, 'eggs is implausibly large')
      .optional(),
    total: z
      .number('total must be a number')
      .int('total must be a whole number')
      .min(0, 'total must not be negative')
      .max(2 ** 31 - 1, 'total is too large')
      .optional(),
  })
  .refine((r) => (r.eggs === undefined) !== (r.total === undefined), {
    error: 'give either eggs or total, not both or neither',
  });
export type ReadingInput = z.infer<typeof readingInputSchema>;

/** A reading's JSON Schema (without its dialect line), shown for each item of a batch in the API document. */
const readingJsonSchema = Object.fromEntries(
  Object.entries(z.toJSONSchema(readingInputSchema, { io: 'input' })).filter(
    ([k]) => k !== '$schema',
  ),
);

/**
 * The batch envelope. Each reading is checked on its own (readingInputSchema, by the ingest service) so
 * that good readings land beside bad ones; the document shows each item as that reading.
 */
export const readingsBatchSchema = z.object({
  readings: z.array(z.unknown().meta(readingJsonSchema), 'readings must be a list'),
});

export const ingestResultSchema = z.object({
  accepted: z.number().int(),
  duplicates: z.number().int(),
  rejected: z.array(z.object({ index: z.number().int(), reason: z.string() })),
  /** Counter ids not yet mapped to a house: their readings are kept for the integrator to map. */
  unmappedCounters: z.array(z.string()),
});
export type IngestResult = z.infer<typeof ingestResultSchema>;

export const gatewayCreateSchema = z.object({
  name: z.string().trim().min(1, 'Give the gateway a name').max(80),
});
export type GatewayCreate = z.infer<typeof gatewayCreateSchema>;

export const gatewaySchema = z.object({
  id: z.number().int(),
  farmId: z.number().int(),
  name: z.string(),
  keyPrefix: z.string(),
  createdAt: z.iso.datetime(),
  revokedAt: z.iso.datetime().nullable(),
  lastUsedAt: z.iso.datetime().nullable(),
});
export type Gateway = z.infer<typeof gatewaySchema>;

/** Only the answer to creating a gateway carries its key, once. */
export const gatewayCreatedSchema = gatewaySchema.extend({ key: z.string() });
export type GatewayCreated = z.infer<typeof gatewayCreatedSchema>;
