import { customType } from 'drizzle-orm/pg-core';

/** PostgreSQL `bytea` (node-postgres reads it as a Buffer); drizzle has no built-in column for it. */
export const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'bytea' });
