import { index, integer, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { farms } from './farms';
import { users } from './users';

export const gateways = pgTable(
  'gateways',
  {
    id: serial('id').primaryKey(),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    /** SHA-256 of the key, hex; the key itself is shown once and never stored. */
    keyHash: text('key_hash').notNull(),
    /** The key's first characters, so people can tell their keys apart. */
    keyPrefix: text('key_prefix').notNull(),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
    lastUsedAt: timestamp('last_used_at', { withTimezone: true }),
  },
  (t) => [
    // Every ingest request looks its gateway up by key hash.
    uniqueIndex('gateways_key_hash_unique').on(t.keyHash),
    // The gateways page lists a farm's gateways.
    index('gateways_farm_idx').on(t.farmId),
  ],
);
