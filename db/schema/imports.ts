import {
  bigint,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  serial,
  text,
  timestamp,
  unique,
} from 'drizzle-orm/pg-core';
import { IMPORT_STATES } from '@tierscope/domain';
import { bytea } from './bytea';
import { farms } from './farms';
import { houses } from './houses';
import { users } from './users';

export const importState = pgEnum('import_state', IMPORT_STATES);

/** One uploaded counter export for a house, from upload through its background run to its summary. */
export const imports = pgTable(
  'imports',
  {
    id: serial('id').primaryKey(),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    houseId: integer('house_id')
      .notNull()
      .references(() => houses.id, { onDelete: 'cascade' }),
    /** the file as kept under the data folder (a random name) */
    storedName: text('stored_name').notNull(),
    fileName: text('file_name').notNull(),
    bytes: bigint('bytes', { mode: 'number' }).notNull(),
    mapping: jsonb('mapping').notNull(),
    state: importState('state').notNull().default('queued'),
    linesRead: integer('lines_read').notNull().default(0),
    readingsAdded: integer('readings_added').notNull().default(0),
    duplicates: integer('duplicates').notNull().default(0),
    errorCount: integer('error_count').notNull().default(0),
    bytesRead: bigint('bytes_read', { mode: 'number' }).notNull().default(0),
    firstTs: timestamp('first_ts', { withTimezone: true }),
    lastTs: timestamp('last_ts', { withTimezone: true }),
    message: text('message'),
    /** set by a person; the running job stops at its next chunk */
    cancelRequestedAt: timestamp('cancel_requested_at', { withTimezone: true }),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp('started_at', { withTimezone: true }),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
  },
  (t) => [
    // The imports page lists a farm's imports, newest first.
    index('imports_farm_created_idx').on(t.farmId, t.createdAt),
    // On start the API looks for imports a stop interrupted.
    index('imports_state_idx').on(t.state),
  ],
);

/** Lines an import could not take, with what was wrong (capped per import; the count is on the import). */
export const importErrors = pgTable(
  'import_errors',
  {
    importId: integer('import_id')
      .notNull()
      .references(() => imports.id, { onDelete: 'cascade' }),
    line: integer('line').notNull(),
    column: text('column'),
    message: text('message').notNull(),
  },
  // Errors are read per import in line order.
  (t) => [index('import_errors_import_line_idx').on(t.importId, t.line)],
);

/** Column mappings kept by name, so the next export of the same controller maps in one click. */
export const importMappings = pgTable(
  'import_mappings',
  {
    id: serial('id').primaryKey(),
    farmId: integer('farm_id')
      .notNull()
      .references(() => farms.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    mapping: jsonb('mapping').notNull(),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  // A farm's mappings are chosen by name; saving the same name again replaces it.
  (t) => [unique('import_mappings_farm_name_unique').on(t.farmId, t.name)],
);

/**
 * An uploaded export's bytes in 1 MiB pieces, kept in PostgreSQL from upload until its import ends, so any
 * API process can run (or take over) the import (docs/adr/0005). Keyed by the upload's stored name.
 */
export const importFileChunks = pgTable(
  'import_file_chunks',
  {
    storedName: text('stored_name').notNull(),
    seq: integer('seq').notNull(),
    data: bytea('data').notNull(),
  },
  (t) => [primaryKey({ columns: [t.storedName, t.seq] })],
);
