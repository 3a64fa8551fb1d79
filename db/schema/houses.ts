import {
  index,
  integer,
  pgTable,
  real,
  serial,
  text,
  timestamp,
  unique,
} from 'drizzle-orm/pg-core';
import { farms } from './farms';

export const houses = pgTable(
  'houses',
  {
    id: serial('id').primaryKey(),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    rows: integer('rows').notNull(),
    tiers: integer('tiers').notNull(),
    /** IANA zone; production days and every time shown are in it. */
    timezone: text('timezone').notNull(),
    /** "HH:MM" local time at which the production day starts. */
    lightsOn: text('lights_on').notNull(),
    photoperiodHours: real('photoperiod_hours').notNull(),
    shortfallThresholdPct: real('shortfall_threshold_pct').notNull().default(10),
    /** Price per dozen eggs, for the value of eggs lost; none set means no money figure. */
    eggPricePerDozen: real('egg_price_per_dozen'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    // Two houses of one farm with the same name would be indistinguishable on every screen.
    unique('houses_farm_name_unique').on(t.farmId, t.name),
    // The farms page lists houses by farm.
    index('houses_farm_idx').on(t.farmId),
  ],
);
