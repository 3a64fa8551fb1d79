import {
  boolean,
  integer,
  pgTable,
  serial,
  text,
  timestamp,
  uniqueIndex,
} from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

export const users = pgTable(
  'users',
  {
    id: serial('id').primaryKey(),
    email: text('email').notNull(),
    name: text('name').notNull(),
    /** argon2id PHC string; never the password. */
    passwordHash: text('password_hash').notNull(),
    disabled: boolean('disabled').notNull().default(false),
    /** Carried in every token; raised when the password is reset, so tokens issued before stop working. */
    sessionVersion: integer('session_version').notNull().default(0),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  // Sign-in looks users up by e-mail, whatever its case.
  (t) => [uniqueIndex('users_email_unique').on(sql`lower(${t.email})`)],
);
