import { Readable } from 'node:stream';
import { createTestDatabase } from '@tierscope/db/testing';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { copyReadings } from './bulk-ingest.repository';
import { countersOfHouse } from '../houses/houses.repository';
import { ensureReadingPartitions } from './ingest.repository';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  await ensureReadingPartitions(database.db, ['2026-10-01']);
});
afterAll(async () => {
  await database.drop();
});

describe('copyReadings (the bulk path)', () => {
  it('loads rows once, however often the same rows are copied, and keeps the rollups equal to them', async () => {
    const counters = await countersOfHouse(database.db, fixture.houseA);
    const lines: string[] = [];
    let expected = 0;
    for (let step = 0; step < 200; step++) {
      const ts = new Date(Date.UTC(2026, 9, 5, 8) + step * 5 * 60_000).toISOString();
      for (const c of counters) {
        const eggs = (step * 7 + c.id) % 40;
        expected += eggs;
        lines.push(`${c.id},${ts},${eggs},`);
      }
    }
    const csv = () => Readable.from([lines.join('\n') + '\n']);
    expect((await copyReadings(database.pool, fixture.farmA, csv())).added).toBe(lines.length);
    expect((await copyReadings(database.pool, fixture.farmA, csv())).added).toBe(0);
    const sums = await database.db.execute<{
      raw: number;
      hourly: number;
      days: number;
      collector: number;
    }>(sql`
      select (select sum(eggs)::int from readings) as raw,
             (select sum(eggs)::int from counter_hour_rollups) as hourly,
             (select sum(eggs)::int from section_day_rollups) as days,
             (select sum(eggs)::int from collector_day_rollups) as collector`);
    const row = sums.rows[0]!;
    expect(row.raw).toBe(expected);
    expect(row.hourly).toBe(expected);
    expect(row.days + row.collector).toBe(expected);
  });

  it('keeps nothing of a load with a bad row', async () => {
    const before = await database.db.execute<{ n: number }>(
      sql`select count(*)::int as n from readings`,
    );
    const bad = Readable.from([
      '1,2026-10-06T08:00:00Z,5,\nnot-a-number,2026-10-06T08:05:00Z,5,\n',
    ]);
    await expect(copyReadings(database.pool, fixture.farmA, bad)).rejects.toThrow();
    const after = await database.db.execute<{ n: number }>(
      sql`select count(*)::int as n from readings`,
    );
    expect(after.rows[0]?.n).toBe(before.rows[0]?.n);
  });
});
