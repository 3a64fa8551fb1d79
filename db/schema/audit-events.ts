import { bigserial, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { farms } from './farms';
import { users } from './users';

export const auditEvents = pgTable(
  'audit_events',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    farmId: integer('farm_id').references(() => farms.id, { onDelete: 'set null' }),
    actorUserId: integer('actor_user_id').references(() => users.id, { onDelete: 'set null' }),
    /** e.g. "house.update" */
    action: text('action').notNull(),
    entity: text('entity').notNull(),
    entityId: text('entity_id').notNull(),
    before: jsonb('before'),
    after: jsonb('after'),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
  },
  // The audit trail is read per farm, newest first.
  (t) => [index('audit_events_farm_at_idx').on(t.farmId, t.at)],
);
