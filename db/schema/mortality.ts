import { date, integer, pgTable, serial, unique } from 'drizzle-orm/pg-core';
import { flocks } from './flocks';

export const mortality = pgTable(
  'mortality',
  {
    id: serial('id').primaryKey(),
    flockId: integer('flock_id')
      .notNull()
      .references(() => flocks.id, { onDelete: 'cascade' }),
    date: date('date').notNull(),
    dead: integer('dead').notNull().default(0),
    culled: integer('culled').notNull().default(0),
  },
  // One entry per flock per day; hens alive per day are summed along this index.
  (t) => [unique('mortality_flock_date_unique').on(t.flockId, t.date)],
);
