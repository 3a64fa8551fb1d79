import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from './schema/index';

export type Database = NodePgDatabase<typeof schema>;

export interface DatabaseHandle {
  readonly db: Database;
  readonly pool: pg.Pool;
  close(): Promise<void>;
}

/** One pool per process; the API, scripts and tests all open the database through here. */
export function openDatabase(url: string, options: { max?: number } = {}): DatabaseHandle {
  const pool = new pg.Pool({ connectionString: url, max: options.max ?? 10 });
  // A connection lost to a database restart must not crash the process: the query in progress fails
  // (and the caller answers 503), idle clients are dropped, and the pool reconnects on the next query.
  pool.on('error', () => undefined);
  pool.on('connect', (client) => {
    client.on('error', () => undefined);
  });
  const db = drizzle({ client: pool, schema });
  return { db, pool, close: () => pool.end() };
}
