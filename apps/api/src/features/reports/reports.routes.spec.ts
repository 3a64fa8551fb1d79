import { schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { insertTestException, seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp } from '../../testing/test-app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let manager: string;
const DAYS = ['2026-11-10', '2026-11-11', '2026-11-12'];

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db);
  manager = await bearerFor(app, fixture.usersA.manager.email);
  const db = database.db;
  await db
    .update(schema.houses)
    .set({ eggPricePerDozen: 3 })
    .where(eq(schema.houses.id, fixture.houseA));
  const [flock] = await db
    .insert(schema.flocks)
    .values({
      houseId: fixture.houseA,
      placedOn: '2026-10-01',
      hensHoused: 1200,
      ageAtPlacementWeeks: 20,
    })
    .returning();
  await db
    .insert(schema.mortality)
    .values({ flockId: flock!.id, date: '2026-11-10', dead: 20, culled: 0 });
  const sections = await db
    .select()
    .from(schema.sections)
    .where(eq(schema.sections.houseId, fixture.houseA));
  // 12 sections × 90 eggs a day, except row 2 tier 3 on the 12th.
  for (const day of DAYS) {
    await db.insert(schema.sectionDayRollups).values(
      sections.map((s) => ({
        farmId: fixture.farmA,
        sectionId: s.id,
        day,
        eggs: day === '2026-11-12' && s.row === 2 && s.tier === 3 ? 60 : 90,
      })),
    );
    await db.insert(schema.collectorDayRollups).values({
      farmId: fixture.farmA,
      houseId: fixture.houseA,
      day,
      eggs: 1050,
    });
  }
  const exception = await insertTestException(db, {
    farmId: fixture.farmA,
    houseId: fixture.houseA,
    row: 2,
    tier: 3,
  });
  await db
    .update(schema.exceptions)
    .set({
      openedDay: '2026-11-12',
      lostByDay: { '2026-11-12': 30, '2026-11-20': 25 },
      eggsLost: 55,
    })
    .where(eq(schema.exceptions.id, exception.id));
});
afterAll(async () => {
  await database.drop();
});

describe('GET /api/v1/reports/daily', () => {
  it('gives every section’s eggs and the house totals, hen-day and collector gap of one production day', async () => {
    const response = await request(app)
      .get(`/api/v1/reports/daily?houseId=${fixture.houseA}&day=2026-11-11`)
      .set('Authorization', manager);
    expect(response.status).toBe(200);
    expect(response.body.sections).toHaveLength(12);
    expect(response.body.sections.every((s: { eggs: number }) => s.eggs === 90)).toBe(true);
    // Hens of the 11th: 1,200 housed less the 20 lost on the 10th. Hen-day counts the collector's eggs
    // (it sees every egg of the house; the belts miss a dead counter's): 1,050 / 1,180 = 89.0 %.
    expect(response.body.totals).toEqual({
      belts: 1080,
      collector: 1050,
      collectorGapPct: -2.8,
      hensAlive: 1180,
      henDayPct: 89,
    });
    expect(response.body.isComplete).toBe(true);
  });

  it('exports the day as CSV with the house lines after the sections', async () => {
    const response = await request(app)
      .get(`/api/v1/reports/daily.csv?houseId=${fixture.houseA}&day=2026-11-12`)
      .set('Authorization', manager);
    expect(response.headers['content-type']).toContain('text/csv');
    const lines = response.text.trim().split('\r\n');
    expect(lines[0]).toBe('row,tier,eggs,expected,percent_of_expected,exception');
    expect(lines).toContain('house,belts,1050,,,');
    expect(lines.find((l) => l.startsWith('2,3,'))).toMatch(/^2,3,60,/);
  });

  it('answers 400 for a bad day and 404 for another farm’s house', async () => {
    const bad = await request(app)
      .get(`/api/v1/reports/daily?houseId=${fixture.houseA}&day=12/11/2026`)
      .set('Authorization', manager);
    expect(bad.status).toBe(400);
    const other = await request(app)
      .get(`/api/v1/reports/daily?houseId=${fixture.houseB}&day=2026-11-11`)
      .set('Authorization', manager);
    expect(other.status).toBe(404);
  });
});

describe('GET /api/v1/reports/farm', () => {
  it('sums eggs and hen-days per house, counts exceptions opened and prices the eggs lost in the range', async () => {
    const response = await request(app)
      .get(`/api/v1/reports/farm?farmId=${fixture.farmA}&from=2026-11-10&to=2026-11-12`)
      .set('Authorization', manager);
    expect(response.status).toBe(200);
    const house = response.body.houses.find(
      (h: { houseId: number }) => h.houseId === fixture.houseA,
    );
    // Belts 1,080 + 1,080 + 1,050 eggs; hen-day from the collector's 3,150 over hen-days
    // 1,200 + 1,180 + 1,180 = 3,560: 88.5 %.
    expect(house).toMatchObject({
      eggs: 3210,
      collector: 3150,
      henDays: 3560,
      henDayPct: 88.5,
      exceptionsOpened: 1,
      eggsLost: 30,
      // 30 eggs at 3.00 a dozen.
      eggsLostValue: 7.5,
    });
    expect(house.days.map((d: { eggs: number }) => d.eggs)).toEqual([1080, 1080, 1050]);
    expect(response.body.totals).toMatchObject({ eggs: 3210, eggsLost: 30, eggsLostValue: 7.5 });
    // The value is in the farm's currency (a new farm's is USD until an administrator changes it).
    expect(response.body.currency).toBe('USD');
  });

  it('checks the range and the farm', async () => {
    const backwards = await request(app)
      .get(`/api/v1/reports/farm?farmId=${fixture.farmA}&from=2026-11-12&to=2026-11-10`)
      .set('Authorization', manager);
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.fields[0].path).toBe('from');
    const other = await request(app)
      .get(`/api/v1/reports/farm?farmId=${fixture.farmB}&from=2026-11-10&to=2026-11-12`)
      .set('Authorization', manager);
    expect(other.status).toBe(404);
  });
});
