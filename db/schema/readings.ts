import { integer, pgTable, primaryKey, timestamp } from 'drizzle-orm/pg-core';
import { counters } from './counters';
import { farms } from './farms';

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
  },
  // One reading per counter per instant: a re-sent reading collides here and is not counted twice.
  (t) => [primaryKey({ name: 'readings_pk', columns: [t.farmId, t.counterId, t.ts] })],
);
