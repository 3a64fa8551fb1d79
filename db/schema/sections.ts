import { integer, pgTable, serial, unique } from 'drizzle-orm/pg-core';
import { houses } from './houses';

export const sections = pgTable(
  'sections',
  {
    id: serial('id').primaryKey(),
    houseId: integer('house_id')
      .notNull()
      .references(() => houses.id, { onDelete: 'cascade' }),
    row: integer('row').notNull(),
    tier: integer('tier').notNull(),
    /** Hens counted in this cell, when known; otherwise hens are assumed spread evenly. */
    birdCount: integer('bird_count'),
  },
  // One cell per (row, tier); the lookup by house uses this index's leading column.
  (t) => [unique('sections_house_row_tier_unique').on(t.houseId, t.row, t.tier)],
);
