import { integer, pgTable, primaryKey, timestamp } from 'drizzle-orm/pg-core';

/**
 * Raw counter readings, partitioned by month on ts (migration 0002 makes the table partitioned; drizzle-kit
 * cannot express that). No foreign keys, on purpose: on a partitioned table they cost a trigger per row and
 * made bulk loads 3.7× slower (docs/adr/0003). Only the ingest paths write here, and they resolve every
 * counter within the gateway's farm first.
 */
export const readings = pgTable(
  'readings',
  {
    /** Leads the key so the table can be distributed by farm (see ARCHITECTURE.md). */
    farmId: integer('farm_id').notNull(),
    counterId: integer('counter_id').notNull(),
    ts: timestamp('ts', { withTimezone: true }).notNull(),
    /** Eggs counted since the counter's previous reading. */
    eggs: integer('eggs').notNull(),
    /** The counter's running total, when it reports totals; intervals are derived from it on ingest. */
    total: integer('total'),
  },
  // One reading per counter per instant: a re-sent reading collides here and is not counted twice.
  (t) => [primaryKey({ name: 'readings_pk', columns: [t.farmId, t.counterId, t.ts] })],
);
