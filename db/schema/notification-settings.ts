import { boolean, integer, pgTable, timestamp } from 'drizzle-orm/pg-core';
import { users } from './users';

/** Which mails a user gets; a user without a row gets every mail their role is sent. */
export const notificationSettings = pgTable('notification_settings', {
  userId: integer('user_id')
    .primaryKey()
    .references(() => users.id, { onDelete: 'cascade' }),
  newExceptions: boolean('new_exceptions').notNull().default(true),
  workOrderAssigned: boolean('work_order_assigned').notNull().default(true),
  workOrderDone: boolean('work_order_done').notNull().default(true),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});
