import { date, integer, pgTable, primaryKey, timestamp } from 'drizzle-orm/pg-core';
import { counters } from './counters';
import { farms } from './farms';
import { houses } from './houses';
import { sections } from './sections';

const farmId = () =>
  integer('farm_id')
    .notNull()
    .references(() => farms.id, { onDelete: 'cascade' });

/**
 * Rollups are kept up to date in the transaction that adds the readings, counting only readings that
 * were actually new, so each equals the sum of its raw readings. Keys start with farm_id so the tables
 * can be distributed by farm with the readings they summarise (ARCHITECTURE.md).
 */
export const counterHourRollups = pgTable(
  'counter_hour_rollups',
  {
    farmId: farmId(),
    counterId: integer('counter_id')
      .notNull()
      .references(() => counters.id, { onDelete: 'cascade' }),
    hour: timestamp('hour', { withTimezone: true }).notNull(),
    eggs: integer('eggs').notNull(),
  },
  // Day curves read a counter's hours in order.
  (t) => [
    primaryKey({ name: 'counter_hour_rollups_pk', columns: [t.farmId, t.counterId, t.hour] }),
  ],
);

/** Eggs of one section on one production day (starting at lights-on, in the house's time zone). */
export const sectionDayRollups = pgTable(
  'section_day_rollups',
  {
    farmId: farmId(),
    sectionId: integer('section_id')
      .notNull()
      .references(() => sections.id, { onDelete: 'cascade' }),
    day: date('day').notNull(),
    eggs: integer('eggs').notNull(),
  },
  // The house map reads every section of a house for a range of days.
  (t) => [primaryKey({ name: 'section_day_rollups_pk', columns: [t.farmId, t.sectionId, t.day] })],
);

/** The collector's eggs per house per production day, to compare with the sum of the belts. */
export const collectorDayRollups = pgTable(
  'collector_day_rollups',
  {
    farmId: farmId(),
    houseId: integer('house_id')
      .notNull()
      .references(() => houses.id, { onDelete: 'cascade' }),
    day: date('day').notNull(),
    eggs: integer('eggs').notNull(),
  },
  // Read per house for a range of days.
  (t) => [primaryKey({ name: 'collector_day_rollups_pk', columns: [t.farmId, t.houseId, t.day] })],
);
