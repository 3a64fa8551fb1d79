import { hensAliveByDay } from '@tierscope/domain';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hensAliveSql } from './hens-alive';
import { insertHouseWithLayout } from './house-records';
import * as schema from './schema/index';
import { createTestDatabase } from './testing';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let flockId: number;

beforeAll(async () => {
  database = await createTestDatabase();
  const [farm] = await database.db.insert(schema.farms).values({ name: 'Hens Farm' }).returning();
  const house = await insertHouseWithLayout(database.db, farm!.id, {
    name: 'H',
    rows: 1,
    tiers: 1,
    timezone: 'UTC',
    lightsOn: '04:00',
    photoperiodHours: 16,
    shortfallThresholdPct: 10,
  });
  const [flock] = await database.db
    .insert(schema.flocks)
    .values({ houseId: house.id, placedOn: '2026-05-01', hensHoused: 100, ageAtPlacementWeeks: 17 })
    .returning();
  flockId = flock!.id;
  // A morning walk each day, and a recording mistake on 3 May that counts more hens than are left.
  await database.db.insert(schema.mortality).values([
    { flockId, date: '2026-05-01', dead: 2, culled: 1 },
    { flockId, date: '2026-05-02', dead: 4, culled: 0 },
    { flockId, date: '2026-05-03', dead: 150, culled: 0 },
  ]);
});
afterAll(async () => {
  await database.drop();
});

describe('hensAliveSql', () => {
  it('counts housed hens less the losses before each day, never below zero, as the domain does', async () => {
    const days = ['2026-05-01', '2026-05-02', '2026-05-03', '2026-05-04'];
    const rows = await database.db.execute<{ day: string; hens: number }>(sql`
      SELECT d::text AS day, ${hensAliveSql(sql`f.id`, sql`f.hens_housed`, sql`d`)} AS hens
      FROM flocks f CROSS JOIN unnest(${sql.param(days)}::date[]) d
      WHERE f.id = ${flockId} ORDER BY d`);
    const fromSql = Object.fromEntries(rows.rows.map((r) => [r.day, r.hens]));
    expect(fromSql).toEqual({
      '2026-05-01': 100,
      '2026-05-02': 97,
      '2026-05-03': 93,
      '2026-05-04': 0,
    });
    const losses = (await database.db.select().from(schema.mortality)).map((m) => ({
      date: m.date,
      dead: m.dead,
      culled: m.culled,
    }));
    const fromDomain = hensAliveByDay(
      { placedOn: '2026-05-01', hensHoused: 100, endedOn: null },
      losses,
      '2026-05-01',
      '2026-05-04',
    );
    expect(Object.fromEntries(fromDomain)).toEqual(fromSql);
  });
});
