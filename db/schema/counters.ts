import { sql } from 'drizzle-orm';
import {
  boolean,
  check,
  index,
  integer,
  pgEnum,
  pgTable,
  serial,
  text,
  timestamp,
  unique,
} from 'drizzle-orm/pg-core';
import { COUNTER_KINDS } from '@tierscope/domain';
import { farms } from './farms';
import { houses } from './houses';
import { sections } from './sections';

export const counterKind = pgEnum('counter_kind', COUNTER_KINDS);

export const counters = pgTable(
  'counters',
  {
    id: serial('id').primaryKey(),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    /** Null while a counter that a gateway reported is not yet mapped by an integrator. */
    houseId: integer('house_id').references(() => houses.id, { onDelete: 'cascade' }),
    sectionId: integer('section_id').references(() => sections.id, { onDelete: 'set null' }),
    /** The id as the house controller exports it. */
    externalId: text('external_id').notNull(),
    kind: counterKind('kind').notNull(),
    active: boolean('active').notNull().default(true),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    // Gateways name counters by their external id within their own farm.
    unique('counters_farm_external_unique').on(t.farmId, t.externalId),
    // A house's counter list.
    index('counters_house_idx').on(t.houseId),
    // A collector counts the whole house, never one section.
    check(
      'counters_collector_has_no_section',
      sql`${t.kind} <> 'collector' OR ${t.sectionId} IS NULL`,
    ),
  ],
);
