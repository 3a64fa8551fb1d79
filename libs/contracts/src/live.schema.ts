import {
  EXCEPTION_KINDS,
  EXCEPTION_SCOPES,
  EXCEPTION_STATUSES,
  IMPORT_STATES,
  PERSON_CLOSE_REASONS,
  WINDOW_KINDS,
} from '@tierscope/domain';
import { z } from 'zod';
import { calendarDay, dbId, idParam, instant } from './primitives.schema';

export const mapQuerySchema = z
  .object({
    window: z.enum(WINDOW_KINDS).default('today'),
    from: calendarDay('from is a date such as 2026-11-01').optional(),
    to: calendarDay('to is a date such as 2026-11-30').optional(),
  })
  .refine(
    (q) => q.window !== 'custom' || (q.from !== undefined && q.to !== undefined && q.from <= q.to),
    {
      error: 'a custom window needs from and to, with from ≤ to',
      path: ['from'],
    },
  );
export type MapQuery = z.infer<typeof mapQuerySchema>;

export const mapCellSchema = z.object({
  row: z.number().int(),
  tier: z.number().int(),
  eggs: z.number().nullable(),
  expected: z.number().nullable(),
  ratio: z.number().nullable(),
  pValue: z.number().nullable(),
  /** expected from its tier peers, or (in a short tier) from the whole tier's usual share of the house */
  yardstick: z.enum(['peers', 'tier']),
  exceptionId: z.number().int().nullable(),
  exceptionKind: z.enum(EXCEPTION_KINDS).nullable(),
  isLearning: z.boolean(),
  /** today: the time of this section's newest reading (its data horizon); null for other windows */
  dataUntil: z.iso.datetime().nullable(),
  /** today: its counter's data is more than 30 min behind the house's newest (a late gateway or cable) */
  isDataLate: z.boolean(),
});
export type MapCell = z.infer<typeof mapCellSchema>;

/**
 * A whole row or tier as the engine judged it: a row against the other rows, a tier's share of the house
 * against its own recent share. A short tier hides in its cells (each is compared with its own tier), so the
 * map shows these beside the cells.
 */
export const lineJudgementSchema = z.object({
  /** the row or tier number */
  at: z.number().int(),
  eggs: z.number(),
  expected: z.number(),
  ratio: z.number(),
  /** beyond the threshold and not chance */
  isShort: z.boolean(),
  /** the row or tier exception covering it in the window, if any */
  exceptionId: z.number().int().nullable(),
  exceptionStatus: z.enum(EXCEPTION_STATUSES).nullable(),
});
export type LineJudgement = z.infer<typeof lineJudgementSchema>;

export const houseMapSchema = z.object({
  houseId: z.number().int(),
  farmId: z.number().int(),
  houseName: z.string(),
  rows: z.number().int(),
  tiers: z.number().int(),
  timezone: z.string(),
  window: z.object({
    kind: z.enum(WINDOW_KINDS),
    firstDay: z.string(),
    lastDay: z.string(),
    from: z.iso.datetime(),
    to: z.iso.datetime(),
    isComplete: z.boolean(),
  }),
  cells: z.array(mapCellSchema),
  /** each row against the other rows */
  byRow: z.array(lineJudgementSchema),
  /** each tier's share of the house against its own recent share */
  byTier: z.array(lineJudgementSchema),
  belts: z.number().int(),
  collector: z.number().int(),
  henDayPct: z.number().nullable(),
  openExceptions: z.number().int(),
  /** past days of the house are being judged (after an import, a gateway's backlog, a counter placed) */
  isJudgingPastDays: z.boolean(),
  updatedAt: z.iso.datetime(),
});
export type HouseMap = z.infer<typeof houseMapSchema>;

/** What an exception measured at one moment: eggs against expected. */
export const exceptionMeasureSchema = z.object({
  eggs: z.number(),
  expected: z.number(),
  ratio: z.number(),
});

export const exceptionSchema = z.object({
  id: z.number().int(),
  farmId: z.number().int(),
  houseId: z.number().int(),
  houseName: z.string(),
  /** the house's IANA time zone: its times are shown on its own clock */
  timezone: z.string(),
  kind: z.enum(EXCEPTION_KINDS),
  scope: z.enum(EXCEPTION_SCOPES),
  row: z.number().int().nullable(),
  tier: z.number().int().nullable(),
  status: z.enum(EXCEPTION_STATUSES),
  isLearning: z.boolean(),
  openedAt: z.iso.datetime(),
  closedAt: z.iso.datetime().nullable(),
  eggs: z.number(),
  expected: z.number(),
  ratio: z.number(),
  pValue: z.number(),
  worstRatio: z.number(),
  /** what it measured when it opened (eggs, expected, ratio); null for exceptions kept from before */
  atOpen: exceptionMeasureSchema.nullable(),
  eggsLost: z.number().int(),
  eggsLostValue: z.number().nullable(),
  likelyChecks: z.array(z.string()),
  acknowledgedAt: z.iso.datetime().nullable(),
  acknowledgedBy: z.string().nullable(),
  closeReason: z.string().nullable(),
  closeNote: z.string().nullable(),
});
export type ExceptionView = z.infer<typeof exceptionSchema>;

export const exceptionsQuerySchema = z.object({
  farmId: idParam.optional(),
  houseId: idParam.optional(),
  status: z.enum([...EXCEPTION_STATUSES, 'live']).optional(),
  kind: z.enum(EXCEPTION_KINDS).optional(),
  from: instant().optional(),
  to: instant().optional(),
});
export type ExceptionsQuery = z.infer<typeof exceptionsQuerySchema>;

export const closeExceptionSchema = z.object({
  reason: z.enum(PERSON_CLOSE_REASONS, 'Choose why it is closed'),
  note: z.string().trim().max(1000).optional(),
});
export type CloseException = z.infer<typeof closeExceptionSchema>;

/** Messages the browser sends on /api/v1/live. */
/**
 * Close codes of the live socket the browser acts on: sign in again (no reconnect); reconnect (access
 * changed, or the server restarting — 1012, "Service Restart" in RFC 6455's registry).
 */
export const LIVE_CLOSE = { signIn: 4401, accessChanged: 4403, restarting: 1012 } as const;

export const liveClientMessageSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('auth'), token: z.string().min(1) }),
  z.object({ type: z.literal('subscribe'), houseId: dbId }),
  z.object({ type: z.literal('unsubscribe'), houseId: dbId }),
]);
export type LiveClientMessage = z.infer<typeof liveClientMessageSchema>;

/** Messages the server sends on /api/v1/live. */
export const liveServerMessageSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('ready') }),
  z.object({ type: z.literal('snapshot'), houseId: z.number().int(), map: houseMapSchema }),
  z.object({ type: z.literal('frame'), houseId: z.number().int(), map: houseMapSchema }),
  z.object({ type: z.literal('exception'), houseId: z.number().int(), exception: exceptionSchema }),
  /** progress of a historical import into a subscribed house */
  z.object({
    type: z.literal('import'),
    houseId: z.number().int(),
    import: z.object({
      id: z.number().int(),
      state: z.enum(IMPORT_STATES),
      linesRead: z.number().int(),
      readingsAdded: z.number().int(),
      duplicates: z.number().int(),
      errorCount: z.number().int(),
      bytesRead: z.number().int(),
      bytes: z.number().int(),
    }),
  }),
  z.object({
    type: z.literal('error'),
    code: z.string(),
    message: z.string(),
    houseId: z.number().int().optional(),
  }),
]);
export type LiveServerMessage = z.infer<typeof liveServerMessageSchema>;

export const cellDetailSchema = z.object({
  row: z.number().int(),
  tier: z.number().int(),
  timezone: z.string(),
  /** today so far, hour by hour: this section's cumulative eggs and its tier peers' median */
  today: z.array(
    z.object({ hour: z.iso.datetime(), eggs: z.number(), peers: z.number().nullable() }),
  ),
  /** the last 14 complete days against what was expected of this section */
  days: z.array(
    z.object({ day: z.string(), eggs: z.number().nullable(), expected: z.number().nullable() }),
  ),
  exception: exceptionSchema.nullable(),
  /** for a silent counter: since when it counted nothing and what it missed; null otherwise */
  silence: z
    .object({
      since: z.iso.datetime(),
      usualByNow: z.number().nullable(),
      notCounted: z.number().int(),
    })
    .nullable(),
  likelyChecks: z.array(z.string()),
});
export type CellDetail = z.infer<typeof cellDetailSchema>;
