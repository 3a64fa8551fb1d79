import { bigserial, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/**
 * What several API processes on one database share beside the data itself (ADR 0005).
 *
 * An event too large for a NOTIFY payload (PostgreSQL's limit is 8,000 bytes) is kept here for a while;
 * the notification carries its id and each process reads it once.
 */
export const eventPayloads = pgTable(
  'event_payloads',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    body: jsonb('body').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('event_payloads_created_idx').on(t.createdAt)],
);

/**
 * Work only one process may do at a time (a house's evaluation) or once per period across the cluster (the
 * minute sweep, the daily housekeeping): whoever holds an unexpired lease does it. A process that dies
 * holds its lease only until it expires.
 */
export const leases = pgTable('leases', {
  name: text('name').primaryKey(),
  holder: text('holder').notNull(),
  until: timestamp('until', { withTimezone: true }).notNull(),
});

/** The sign-in limiter's counts, shared by every process (express-rate-limit store). */
export const rateLimitHits = pgTable('rate_limit_hits', {
  key: text('key').primaryKey(),
  hits: integer('hits').notNull(),
  resetAt: timestamp('reset_at', { withTimezone: true }).notNull(),
});
