import { schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { addDays, compartmentalLay, productionDayOf } from '@tierscope/domain';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp } from '../../testing/test-app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let manager: string;

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db);
  manager = await bearerFor(app, fixture.usersA.manager.email);
});
afterAll(async () => {
  await database.drop();
});

const today = () => productionDayOf(new Date(), 'America/Chicago', '04:00');

describe('placing a flock and recording losses', () => {
  let flockId = 0;

  it('places a flock, refuses a second one while it is in the house, and answers its hens', async () => {
    const placed = await request(app)
      .post(`/api/v1/houses/${fixture.houseA}/flocks`)
      .set('Authorization', manager)
      .send({
        placedOn: addDays(today(), -60),
        hensHoused: 12_000,
        ageAtPlacementWeeks: 17,
        breed: 'brown hybrid',
        birdsPerSection: [{ row: 1, tier: 1, birds: 1000 }],
      });
    expect(placed.status).toBe(201);
    expect(placed.body).toMatchObject({
      hensHoused: 12_000,
      hensAlive: 12_000,
      lost: 0,
      endedOn: null,
    });
    flockId = placed.body.id;
    const [section] = await database.db
      .select({ birds: schema.sections.birdCount })
      .from(schema.sections)
      .where(eq(schema.sections.houseId, fixture.houseA))
      .orderBy(schema.sections.row, schema.sections.tier)
      .limit(1);
    expect(section?.birds).toBe(1000);
    const second = await request(app)
      .post(`/api/v1/houses/${fixture.houseA}/flocks`)
      .set('Authorization', manager)
      .send({ placedOn: today(), hensHoused: 10, ageAtPlacementWeeks: 17 });
    expect(second.status).toBe(409);
  });

  it('records the morning walk per day, replacing an entry made twice for one day', async () => {
    const day = addDays(today(), -10);
    for (const dead of [3, 4]) {
      const response = await request(app)
        .put(`/api/v1/flocks/${flockId}/mortality/${day}`)
        .set('Authorization', manager)
        .send({ dead, culled: 1 });
      expect(response.status).toBe(200);
    }
    const list = await request(app)
      .get(`/api/v1/houses/${fixture.houseA}/flocks`)
      .set('Authorization', manager);
    expect(list.body[0]).toMatchObject({ lost: 5, hensAlive: 11_995 });
  });

  it('refuses a day outside the flock’s time and a negative count, with the field', async () => {
    const before = await request(app)
      .put(`/api/v1/flocks/${flockId}/mortality/${addDays(today(), -400)}`)
      .set('Authorization', manager)
      .send({ dead: 1, culled: 0 });
    expect(before.status).toBe(400);
    expect(before.body.error.fields[0].path).toBe('date');
    const negative = await request(app)
      .put(`/api/v1/flocks/${flockId}/mortality/${today()}`)
      .set('Authorization', manager)
      .send({ dead: -1, culled: 0 });
    expect(negative.status).toBe(400);
    expect(negative.body.error.fields[0]).toEqual({ path: 'dead', message: 'Not negative' });
  });

  it('lets only managers and admins of the farm keep flock records', async () => {
    const crew = await bearerFor(app, fixture.usersA.crew.email);
    const asCrew = await request(app)
      .put(`/api/v1/flocks/${flockId}/mortality/${today()}`)
      .set('Authorization', crew)
      .send({ dead: 1, culled: 0 });
    expect(asCrew.status).toBe(403);
    const readable = await request(app)
      .get(`/api/v1/flocks/${flockId}/production`)
      .set('Authorization', crew);
    expect(readable.status).toBe(200);
    const otherFarm = await request(app)
      .get(`/api/v1/flocks/${flockId}/production`)
      .set('Authorization', await bearerFor(app, fixture.adminB.email));
    expect(otherFarm.status).toBe(404);
  });
});

describe('GET /api/v1/flocks/:id/production', () => {
  it('computes hen-day production per day and week from the counts and the losses, and fits the lay curve', async () => {
    // A house of its own with a flock placed 10 weeks ago at 18 weeks of age.
    const admin = await bearerFor(app, fixture.usersA.admin.email);
    const house = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({
        name: 'Flock house',
        rows: 2,
        tiers: 1,
        timezone: 'America/Chicago',
        lightsOn: '04:00',
        photoperiodHours: 16,
      });
    const houseId = house.body.id as number;
    const placedOn = addDays(today(), -70);
    const flock = await request(app)
      .post(`/api/v1/houses/${houseId}/flocks`)
      .set('Authorization', manager)
      .send({ placedOn, hensHoused: 2000, ageAtPlacementWeeks: 18 });
    const flockId = flock.body.id as number;
    await request(app)
      .put(`/api/v1/flocks/${flockId}/mortality/${placedOn}`)
      .set('Authorization', manager)
      .send({ dead: 10, culled: 0 });
    const sections = await database.db
      .select()
      .from(schema.sections)
      .where(eq(schema.sections.houseId, houseId));
    // Daily eggs that follow a lay curve: half of the day's eggs on each of the two belts.
    const curve = { a: 100, b: 0.004, c: 0.5, d: 18 };
    const rows = [];
    for (let i = 0; i < 70; i++) {
      const day = addDays(placedOn, i);
      const age = 18 + Math.floor(i / 7);
      const eggs = Math.round((compartmentalLay(age + 0.5, curve) / 100) * 1990);
      for (const [k, s] of sections.entries()) {
        rows.push({
          farmId: fixture.farmA,
          sectionId: s.id,
          day,
          eggs: k === 0 ? Math.ceil(eggs / 2) : Math.floor(eggs / 2),
        });
      }
    }
    await database.db.insert(schema.sectionDayRollups).values(rows);

    const response = await request(app)
      .get(`/api/v1/flocks/${flockId}/production`)
      .set('Authorization', manager);
    expect(response.status).toBe(200);
    const body = response.body;
    // Day 1 still counts the 10 hens found dead that day (the product's convention); day 2 does not.
    expect(body.days[0]).toMatchObject({ day: placedOn, hensAlive: 2000, dead: 10, ageWeeks: 18 });
    expect(body.days[1]).toMatchObject({ hensAlive: 1990 });
    const day2 = body.days[1];
    expect(day2.henDayPct).toBeCloseTo((100 * day2.eggs) / 1990, 1);
    // A week's hen-day production is its eggs over its hen-days.
    const week19 = body.weeks.find((w: { ageWeeks: number }) => w.ageWeeks === 19);
    expect(week19.days).toBe(7);
    expect(week19.henDays).toBe(7 * 1990);
    expect(week19.henDayPct).toBeCloseTo((100 * week19.eggs) / week19.henDays, 1);
    // Cumulative mortality 10 / 2000 = 0.5 %; livability 99.5 %.
    expect(body.totals).toMatchObject({ cumulativeMortalityPct: 0.5, livabilityPct: 99.5 });
    expect(body.totals.eggsPerHenHoused).toBeCloseTo(body.totals.eggs / 2000, 1);
    expect(body.fit).toMatchObject({ model: 'compartmental', isGoodEnough: true });
    expect(body.fit.r2).toBeGreaterThan(0.95);
    expect(Math.abs(week19.fittedPct - week19.henDayPct)).toBeLessThan(8);
  });
});
