import { sql } from 'drizzle-orm';
import {
  bigserial,
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  text,
  timestamp,
  uniqueIndex,
} from 'drizzle-orm/pg-core';
import {
  CLOSE_REASONS,
  EXCEPTION_KINDS,
  EXCEPTION_SCOPES,
  EXCEPTION_STATUSES,
} from '@tierscope/domain';
import { farms } from './farms';
import { houses } from './houses';
import { users } from './users';

export const exceptionKind = pgEnum('exception_kind', EXCEPTION_KINDS);
export const exceptionScope = pgEnum('exception_scope', EXCEPTION_SCOPES);
export const exceptionStatus = pgEnum('exception_status', EXCEPTION_STATUSES);
export const closeReason = pgEnum('close_reason', CLOSE_REASONS);

/** One flagged spot from opening to end, with what it measured at open, at worst and now. */
export const exceptions = pgTable(
  'exceptions',
  {
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    id: bigserial('id', { mode: 'number' }).notNull(),
    houseId: integer('house_id')
      .notNull()
      .references(() => houses.id, { onDelete: 'cascade' }),
    kind: exceptionKind('kind').notNull(),
    scope: exceptionScope('scope').notNull(),
    row: integer('row'),
    tier: integer('tier'),
    status: exceptionStatus('status').notNull().default('open'),
    isLearning: boolean('is_learning').notNull().default(false),
    openedAt: timestamp('opened_at', { withTimezone: true }).notNull(),
    openedDay: date('opened_day').notNull(),
    eggs: integer('eggs').notNull(),
    expected: real('expected').notNull(),
    ratio: real('ratio').notNull(),
    pValue: doublePrecision('p_value').notNull(),
    worstRatio: real('worst_ratio').notNull(),
    atOpen: jsonb('at_open').notNull(),
    eggsLost: integer('eggs_lost').notNull().default(0),
    /** production day → eggs lost that day, so a day re-evaluated replaces its own figure */
    lostByDay: jsonb('lost_by_day').notNull().default({}),
    lastEvaluatedAt: timestamp('last_evaluated_at', { withTimezone: true }).notNull(),
    acknowledgedAt: timestamp('acknowledged_at', { withTimezone: true }),
    acknowledgedBy: integer('acknowledged_by').references(() => users.id, { onDelete: 'set null' }),
    closedAt: timestamp('closed_at', { withTimezone: true }),
    closedBy: integer('closed_by').references(() => users.id, { onDelete: 'set null' }),
    closeReason: closeReason('close_reason'),
    closeNote: text('close_note'),
    /** when the farm's managers were mailed about it; null until then (at most one mail per exception) */
    notifiedAt: timestamp('notified_at', { withTimezone: true }),
  },
  (t) => [
    // Farm first, so exceptions distribute with the readings they come from.
    primaryKey({ name: 'exceptions_pk', columns: [t.farmId, t.id] }),
    // The exceptions page and the map read a house's exceptions, newest first.
    index('exceptions_house_opened_idx').on(t.houseId, t.openedAt),
    // At most one live exception per spot; re-evaluating history finds the same one again.
    uniqueIndex('exceptions_one_live_per_spot')
      .on(t.houseId, t.kind, t.scope, sql`coalesce(${t.row}, 0)`, sql`coalesce(${t.tier}, 0)`)
      .where(sql`${t.status} <> 'closed'`),
    // Historical evaluation is idempotent: the same spot opened at the same instant is the same exception.
    uniqueIndex('exceptions_spot_opened_unique').on(
      t.houseId,
      t.kind,
      t.scope,
      sql`coalesce(${t.row}, 0)`,
      sql`coalesce(${t.tier}, 0)`,
      t.openedAt,
    ),
  ],
);

/** The shortfall engine's consecutive-evaluation state per house, so a restart does not forget a streak. */
export const houseEvaluations = pgTable('house_evaluations', {
  houseId: integer('house_id')
    .primaryKey()
    .references(() => houses.id, { onDelete: 'cascade' }),
  streaks: jsonb('streaks').notNull(),
  /** the engine's memory between evaluations: stages already judged, each spot's CUSUM */
  engine: jsonb('engine').notNull().default({}),
  evaluatedAt: timestamp('evaluated_at', { withTimezone: true }).notNull(),
});
