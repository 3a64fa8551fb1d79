import {
  index,
  integer,
  pgEnum,
  pgTable,
  serial,
  text,
  timestamp,
  uniqueIndex,
} from 'drizzle-orm/pg-core';
import { users } from './users';

export const USER_TOKEN_PURPOSES = ['invitation', 'password_reset'] as const;
export const userTokenPurpose = pgEnum('user_token_purpose', USER_TOKEN_PURPOSES);

/** Single-use links mailed to a user (set a first password, reset a forgotten one). */
export const userTokens = pgTable(
  'user_tokens',
  {
    id: serial('id').primaryKey(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    purpose: userTokenPurpose('purpose').notNull(),
    /** SHA-256 of the token, hex; the token itself is only in the mail. */
    tokenHash: text('token_hash').notNull(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    usedAt: timestamp('used_at', { withTimezone: true }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    // A link is looked up by its token's hash.
    uniqueIndex('user_tokens_hash_unique').on(t.tokenHash),
    // A new link of a purpose retires the user's older ones.
    index('user_tokens_user_idx').on(t.userId, t.purpose),
  ],
);
