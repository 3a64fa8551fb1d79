import { pgTable, serial, text, timestamp } from 'drizzle-orm/pg-core';

export const farms = pgTable('farms', {
  id: serial('id').primaryKey(),
  name: text('name').notNull(),
  /** ISO 4217 code of the money the farm counts in (the value of eggs lost). */
  currency: text('currency').notNull().default('USD'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});
