import { schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor } from '../../testing/sign-in';
import { createTestApp } from '../../testing/test-app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
let admin: string;

const newHouse = {
  name: 'Layer 7',
  rows: 6,
  tiers: 3,
  timezone: 'America/Chicago',
  lightsOn: '04:00',
  photoperiodHours: 16,
};

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db);
  admin = await bearerFor(app, fixture.usersA.admin.email);
});
afterAll(async () => {
  await database.drop();
});

describe('POST /api/v1/farms/:farmId/houses', () => {
  it('creates the house with one belt counter per section and one collector', async () => {
    const response = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send(newHouse);
    expect(response.status).toBe(201);
    expect(response.body).toMatchObject({
      ...newHouse,
      farmId: fixture.farmA,
      shortfallThresholdPct: 10,
    });
    const counters = response.body.counters as {
      kind: string;
      row: number | null;
      tier: number | null;
      externalId: string;
    }[];
    expect(counters).toHaveLength(6 * 3 + 1);
    const belts = counters.filter((c) => c.kind === 'belt');
    expect(new Set(belts.map((c) => `${c.row}/${c.tier}`)).size).toBe(18);
    const collector = counters.filter((c) => c.kind === 'collector');
    expect(collector).toEqual([expect.objectContaining({ row: null, tier: null })]);
    const listed = await request(app)
      .get(`/api/v1/houses/${response.body.id}/counters`)
      .set('Authorization', admin);
    expect(listed.body).toEqual(response.body.counters);
  });

  it('answers a bad body with 400 and an error per field, and creates nothing', async () => {
    const before = await database.db.select().from(schema.houses);
    const response = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({
        name: '',
        rows: 0,
        tiers: 5,
        timezone: 'Atlantis/Lost',
        lightsOn: '25:00',
        photoperiodHours: 'long',
      });
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe('validation_failed');
    const paths = (response.body.error.fields as { path: string }[]).map((f) => f.path).sort();
    expect(paths).toEqual(['lightsOn', 'name', 'photoperiodHours', 'rows', 'tiers', 'timezone']);
    expect(await database.db.select().from(schema.houses)).toHaveLength(before.length);
  });

  it('refuses a second house with the same name on the farm', async () => {
    const response = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({ ...newHouse, name: 'A1' });
    expect(response.status).toBe(409);
    expect(response.body.error.fields[0].path).toBe('name');
  });

  it('answers malformed JSON with 400, not 500', async () => {
    const response = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .set('Content-Type', 'application/json')
      .send('{"name": "broken",');
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe('validation_failed');
  });

  it('answers a non-numeric farm id with 400', async () => {
    const response = await request(app).get('/api/v1/farms/abc/houses').set('Authorization', admin);
    expect(response.status).toBe(400);
  });
});

describe('PATCH /api/v1/houses/:houseId', () => {
  it('changes settings and records the change in the audit trail', async () => {
    const response = await request(app)
      .patch(`/api/v1/houses/${fixture.houseA}`)
      .set('Authorization', admin)
      .send({ lightsOn: '03:30', shortfallThresholdPct: 8 });
    expect(response.status).toBe(200);
    expect(response.body).toMatchObject({ lightsOn: '03:30', shortfallThresholdPct: 8 });
    const audit = await database.db.select().from(schema.auditEvents);
    const entry = audit.find(
      (a) => a.action === 'house.update' && a.entityId === String(fixture.houseA),
    );
    expect(entry?.actorUserId).toBe(fixture.usersA.admin.id);
    expect((entry?.before as { lightsOn: string }).lightsOn).toBe('04:00');
    expect((entry?.after as { lightsOn: string }).lightsOn).toBe('03:30');
  });

  it('re-lays out sections and counters when rows change before any reading', async () => {
    const created = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({ ...newHouse, name: 'Relayout' });
    const response = await request(app)
      .patch(`/api/v1/houses/${created.body.id}`)
      .set('Authorization', admin)
      .send({ rows: 2 });
    expect(response.status).toBe(200);
    expect(response.body.counters).toHaveLength(2 * 3 + 1);
  });

  it('keeps rows and tiers once the house has counted eggs', async () => {
    const created = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({ ...newHouse, name: 'Counting' });
    const belt = (created.body.counters as { id: number; kind: string }[]).find(
      (c) => c.kind === 'belt',
    );
    await database.db
      .insert(schema.readings)
      .values({ farmId: fixture.farmA, counterId: belt?.id ?? 0, ts: new Date(), eggs: 120 });
    const response = await request(app)
      .patch(`/api/v1/houses/${created.body.id}`)
      .set('Authorization', admin)
      .send({ tiers: 2 });
    expect(response.status).toBe(409);
    const deleted = await request(app)
      .delete(`/api/v1/houses/${created.body.id}`)
      .set('Authorization', admin);
    expect(deleted.status).toBe(409);
    const still = await request(app)
      .get(`/api/v1/houses/${created.body.id}`)
      .set('Authorization', admin);
    expect(still.body.tiers).toBe(3);
  });

  it('refuses an empty change', async () => {
    const response = await request(app)
      .patch(`/api/v1/houses/${fixture.houseA}`)
      .set('Authorization', admin)
      .send({});
    expect(response.status).toBe(400);
  });
});

describe('DELETE /api/v1/houses/:houseId', () => {
  it('deletes a house without readings, with its sections and counters', async () => {
    const created = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({ ...newHouse, name: 'Short-lived' });
    expect(
      (await request(app).delete(`/api/v1/houses/${created.body.id}`).set('Authorization', admin))
        .status,
    ).toBe(204);
    expect(
      (await request(app).get(`/api/v1/houses/${created.body.id}`).set('Authorization', admin))
        .status,
    ).toBe(404);
    const counters = await database.db.select().from(schema.counters);
    expect(counters.filter((c) => c.houseId === created.body.id)).toHaveLength(0);
  });
});
