import { integer, pgTable, primaryKey, timestamp } from 'drizzle-orm/pg-core';
import { counters } from './counters';
import { farms } from './farms';

/**
 * Raw counter readings, partitioned by month on ts (migration 0002 makes the table partitioned; drizzle-kit
 * cannot express that). Its foreign keys point at farms and counters, which would be reference tables on
 * a distributed cluster (ARCHITECTURE.md).
 */
export const readings = pgTable(
  'readings',
  {
    /** Leads the key so the table can be distributed by farm (see ARCHITECTURE.md). */
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    counterId: integer('counter_id')
      .notNull()
      .references(() => counters.id, { onDelete: 'cascade' }),
    ts: timestamp('ts', { withTimezone: true }).notNull(),
    /** Eggs counted since the counter's previous reading. */
    eggs: integer('eggs').notNull(),
    /** The counter's running total, when it reports totals; intervals are derived from it on ingest. */
    total: integer('total'),
  },
  // One reading per counter per instant: a re-sent reading collides here and is not counted twice.
  (t) => [primaryKey({ name: 'readings_pk', columns: [t.farmId, t.counterId, t.ts] })],
);
