import {
  DECIMAL_MARKS,
  DELIMITERS,
  IMPORT_STATES,
  isKnownTimeZone,
  TIMESTAMP_FORMATS,
} from '@tierscope/domain';
import { z } from 'zod';

/** A column by its header name, or by its 1-based position (files without a header line). */
export const columnRefSchema = z.union([
  z.string().trim().min(1, 'Name a column').max(200),
  z.number().int().min(1, 'Columns are numbered from 1').max(10_000),
]);
export type ColumnRef = z.infer<typeof columnRefSchema>;

const common = {
  /** detected from the file when left out */
  delimiter: z.enum(DELIMITERS).optional(),
  decimal: z.enum(DECIMAL_MARKS).default('.'),
  hasHeader: z.boolean().default(true),
  timestamp: columnRefSchema,
  timestampFormat: z.enum(TIMESTAMP_FORMATS).default('iso'),
  /** the zone of times written without an offset */
  timezone: z.string().refine(isKnownTimeZone, 'Give an IANA time zone such as America/Chicago'),
  /** counts since the previous line ("interval") or a counter's running total ("total") */
  mode: z.enum(['interval', 'total']).default('interval'),
};

export const longMappingSchema = z
  .object({
    layout: z.literal('long'),
    ...common,
    /** a column holding the counter's id as the controller exports it… */
    counter: columnRefSchema.optional(),
    /** …or two columns holding the row and the tier */
    row: columnRefSchema.optional(),
    tier: columnRefSchema.optional(),
    eggs: columnRefSchema,
  })
  .refine((m) => (m.counter !== undefined) !== (m.row !== undefined && m.tier !== undefined), {
    error: 'Map either a counter column, or a row and a tier column',
    path: ['counter'],
  });

export const wideColumnSchema = z
  .object({
    column: columnRefSchema,
    counter: z.string().trim().min(1).max(200).optional(),
    row: z.number().int().min(1).optional(),
    tier: z.number().int().min(1).optional(),
  })
  .refine((c) => (c.counter !== undefined) !== (c.row !== undefined && c.tier !== undefined), {
    error: 'Each column names a counter, or a row and a tier',
  });

export const wideMappingSchema = z.object({
  layout: z.literal('wide'),
  ...common,
  /** which column is which counter or section */
  columns: z.array(wideColumnSchema).min(1, 'Map at least one count column').max(2000),
});

export const importMappingSchema = z.discriminatedUnion('layout', [
  longMappingSchema,
  wideMappingSchema,
]);
export type ImportMapping = z.output<typeof importMappingSchema>;
export type ImportMappingInput = z.input<typeof importMappingSchema>;

export const importErrorSchema = z.object({
  line: z.number().int(),
  column: z.string().nullable(),
  message: z.string(),
});
export type ImportLineError = z.infer<typeof importErrorSchema>;

export const importStatusSchema = z.object({
  id: z.number().int(),
  farmId: z.number().int(),
  houseId: z.number().int(),
  houseName: z.string(),
  fileName: z.string(),
  bytes: z.number().int(),
  state: z.enum(IMPORT_STATES),
  /** done, and its days are still being judged (exceptions they bring may yet appear) */
  isJudgingDays: z.boolean(),
  linesRead: z.number().int(),
  readingsAdded: z.number().int(),
  duplicates: z.number().int(),
  errorCount: z.number().int(),
  /** the first lines with errors (all of them in the CSV download) */
  errors: z.array(importErrorSchema),
  bytesRead: z.number().int(),
  firstTs: z.iso.datetime().nullable(),
  lastTs: z.iso.datetime().nullable(),
  message: z.string().nullable(),
  createdBy: z.string().nullable(),
  createdAt: z.iso.datetime(),
  startedAt: z.iso.datetime().nullable(),
  finishedAt: z.iso.datetime().nullable(),
  mapping: importMappingSchema,
});
export type ImportStatus = z.infer<typeof importStatusSchema>;

export const savedMappingCreateSchema = z.object({
  name: z.string().trim().min(1, 'Name the mapping').max(80),
  mapping: importMappingSchema,
});
export const savedMappingSchema = z.object({
  id: z.number().int(),
  farmId: z.number().int(),
  name: z.string(),
  mapping: importMappingSchema,
  createdAt: z.iso.datetime(),
});
export type SavedMapping = z.infer<typeof savedMappingSchema>;
