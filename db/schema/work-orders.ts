import {
  bigint,
  boolean,
  date,
  index,
  integer,
  pgEnum,
  pgTable,
  serial,
  smallint,
  text,
  timestamp,
} from 'drizzle-orm/pg-core';
import { FINDING_CAUSES, WORK_ORDER_PRIORITIES, WORK_ORDER_STATES } from '@tierscope/domain';
import { bytea } from './bytea';
import { farms } from './farms';
import { houses } from './houses';
import { users } from './users';

export const workOrderState = pgEnum('work_order_state', WORK_ORDER_STATES);
export const workOrderPriority = pgEnum('work_order_priority', WORK_ORDER_PRIORITIES);
export const findingCause = pgEnum('finding_cause', FINDING_CAUSES);

/** A job for the crew at one spot of a house, from a flagged exception or opened by hand. */
export const workOrders = pgTable(
  'work_orders',
  {
    id: serial('id').primaryKey(),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    houseId: integer('house_id')
      .notNull()
      .references(() => houses.id, { onDelete: 'cascade' }),
    /** null for the whole house or a whole tier */
    row: smallint('row'),
    /** null for the whole house or a whole row */
    tier: smallint('tier'),
    /** exceptions are keyed (farm_id, id); the farm is this order's own */
    exceptionId: bigint('exception_id', { mode: 'number' }),
    title: text('title').notNull(),
    description: text('description').notNull().default(''),
    priority: workOrderPriority('priority').notNull().default('normal'),
    state: workOrderState('state').notNull().default('open'),
    assigneeId: integer('assignee_id').references(() => users.id, { onDelete: 'set null' }),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    dueOn: date('due_on'),
    findingCause: findingCause('finding_cause'),
    findingNotes: text('finding_notes').notNull().default(''),
    cancelReason: text('cancel_reason'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp('started_at', { withTimezone: true }),
    doneAt: timestamp('done_at', { withTimezone: true }),
    cancelledAt: timestamp('cancelled_at', { withTimezone: true }),
  },
  (t) => [
    // Managers list a farm's orders by state, newest first.
    index('work_orders_farm_state_idx').on(t.farmId, t.state, t.createdAt),
    // "My work": a crew member's own orders.
    index('work_orders_assignee_idx').on(t.assigneeId, t.state),
    // An exception shows the orders opened from it.
    index('work_orders_exception_idx').on(t.farmId, t.exceptionId),
  ],
);

/** The steps of a work order, ticked by whoever did them. */
export const workOrderChecklistItems = pgTable(
  'work_order_checklist_items',
  {
    id: serial('id').primaryKey(),
    workOrderId: integer('work_order_id')
      .notNull()
      .references(() => workOrders.id, { onDelete: 'cascade' }),
    position: smallint('position').notNull(),
    label: text('label').notNull(),
    isChecked: boolean('is_checked').notNull().default(false),
    checkedBy: integer('checked_by').references(() => users.id, { onDelete: 'set null' }),
    checkedAt: timestamp('checked_at', { withTimezone: true }),
  },
  // A work order reads its items in order.
  (t) => [index('work_order_checklist_order_idx').on(t.workOrderId, t.position)],
);

/**
 * Photos attached to a work order. Their bytes are in `work_order_photo_contents` (every API process reads
 * them there); photos taken before that lived under the data folder, named by their random key.
 */
export const workOrderPhotos = pgTable(
  'work_order_photos',
  {
    id: serial('id').primaryKey(),
    workOrderId: integer('work_order_id')
      .notNull()
      .references(() => workOrders.id, { onDelete: 'cascade' }),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    /** random key (the file name under the photos folder for older photos); never the uploader's name */
    storedName: text('stored_name').notNull(),
    originalName: text('original_name').notNull(),
    contentType: text('content_type').notNull(),
    bytes: integer('bytes').notNull(),
    uploadedBy: integer('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
    uploadedAt: timestamp('uploaded_at', { withTimezone: true }).notNull().defaultNow(),
  },
  // A work order lists its photos.
  (t) => [index('work_order_photos_order_idx').on(t.workOrderId)],
);

/**
 * A photo's bytes (re-encoded, at most 2,560 px a side, a few hundred KB), kept in PostgreSQL so any API
 * process serves any photo (docs/adr/0005). A table of its own keeps photo lists light.
 */
export const workOrderPhotoContents = pgTable('work_order_photo_contents', {
  photoId: integer('photo_id')
    .primaryKey()
    .references(() => workOrderPhotos.id, { onDelete: 'cascade' }),
  content: bytea('content').notNull(),
});
