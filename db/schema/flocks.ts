import { date, index, integer, pgTable, serial, text } from 'drizzle-orm/pg-core';
import { houses } from './houses';

export const flocks = pgTable(
  'flocks',
  {
    id: serial('id').primaryKey(),
    houseId: integer('house_id')
      .notNull()
      .references(() => houses.id, { onDelete: 'cascade' }),
    placedOn: date('placed_on').notNull(),
    hensHoused: integer('hens_housed').notNull(),
    ageAtPlacementWeeks: integer('age_at_placement_weeks').notNull(),
    breed: text('breed').notNull().default(''),
    endedOn: date('ended_on'),
  },
  // The current flock of a house is looked up by house.
  (t) => [index('flocks_house_idx').on(t.houseId)],
);
