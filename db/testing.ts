import { randomBytes } from 'node:crypto';
import { openDatabase, runMigrations, type DatabaseHandle } from './index';
import pg from 'pg';

/**
 * A fresh, migrated database of its own for one test file, on the throwaway cluster that `npm test`
 * starts (TEST_PG_URL points at its server). Never a shared seeded database.
 */
export async function createTestDatabase(): Promise<
  DatabaseHandle & { url: string; drop(): Promise<void> }
> {
  const server = process.env['TEST_PG_URL'];
  if (!server) {
    throw new Error(
      'TEST_PG_URL is not set: run the suites through `npm test`, which starts PostgreSQL',
    );
  }
  const name = `t_${randomBytes(6).toString('hex')}`;
  await adminQuery(server, `create database ${name}`);
  const url = `${server}/${name}`;
  const handle = openDatabase(url, { max: 5 });
  await runMigrations(handle.db);
  return {
    ...handle,
    url,
    async drop() {
      await handle.close();
      await adminQuery(server, `drop database if exists ${name} with (force)`);
    },
  };
}

async function adminQuery(server: string, text: string): Promise<void> {
  const client = new pg.Client({ connectionString: `${server}/postgres` });
  await client.connect();
  try {
    await client.query(text);
  } finally {
    await client.end();
  }
}
