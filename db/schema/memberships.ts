import { index, integer, pgEnum, pgTable, primaryKey } from 'drizzle-orm/pg-core';
import { ROLES } from '@tierscope/domain';
import { farms } from './farms';
import { users } from './users';

export const role = pgEnum('role', ROLES);

export const memberships = pgTable(
  'memberships',
  {
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    role: role('role').notNull(),
  },
  (t) => [
    // One role per user per farm.
    primaryKey({ name: 'memberships_pk', columns: [t.userId, t.farmId] }),
    // "Who works on this farm" (user lists, e-mail recipients).
    index('memberships_farm_idx').on(t.farmId),
  ],
);
