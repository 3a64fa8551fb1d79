import { createTestDatabase } from '@tierscope/db/testing';
import type { UnknownCounter } from '@tierscope/contracts';
import { defaultBeltCounterId } from '@tierscope/domain';
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createEventBus, type DomainEvents } from '../../platform/events';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor, gatewayKeyFor } from '../../testing/sign-in';
import { createTestApp } from '../../testing/test-app';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
const events = createEventBus();
let integrator: string;
let keyA: string;
let keyB: string;

/**
 * 2026-11-10 at `hour`:`minute` UTC. The fixture houses keep America/Chicago with lights-on at 04:00, so a
 * production day there runs from 10:00 UTC to 10:00 UTC the next day (CST, UTC−6, in November).
 */
const at = (hour: number, minute = 0, day = 10) =>
  new Date(Date.UTC(2026, 10, day, hour, minute)).toISOString();

const send = (key: string, readings: { counter: string; ts: string; eggs: number }[]) =>
  request(app)
    .post('/api/v1/ingest/readings')
    .set('Authorization', `Bearer ${key}`)
    .send({ readings })
    .expect(200);

const unknownOf = async (farmId: number, bearer = integrator): Promise<UnknownCounter[]> =>
  (
    await request(app)
      .get(`/api/v1/farms/${farmId}/unknown-counters`)
      .set('Authorization', bearer)
      .expect(200)
  ).body;

const idOf = async (externalId: string) => {
  const found = (await unknownOf(fixture.farmA)).find((c) => c.externalId === externalId);
  if (!found) throw new Error(`${externalId} is not an unknown counter`);
  return found.id;
};

const place = (counterId: number, body: object) =>
  request(app)
    .post(`/api/v1/unknown-counters/${counterId}/place`)
    .set('Authorization', integrator)
    .send(body);

async function scalar(query: ReturnType<typeof sql>): Promise<number> {
  const result = await database.db.execute<{ n: number | null }>(query);
  return result.rows[0]?.n ?? 0;
}

/** Eggs the day rollups hold for one belt section of farm A's house. */
const sectionEggs = (row: number, tier: number) =>
  scalar(sql`SELECT coalesce(sum(r.eggs), 0)::int AS n FROM section_day_rollups r
             JOIN sections s ON s.id = r.section_id
             WHERE s.house_id = ${fixture.houseA} AND s.row = ${row} AND s.tier = ${tier}`);

/** Raw readings and hour rollups of one counter: the two must always agree. */
const rawAndHourly = async (externalId: string) => ({
  raw: await scalar(sql`SELECT coalesce(sum(r.eggs), 0)::int AS n FROM readings r
                        JOIN counters c ON c.id = r.counter_id WHERE c.external_id = ${externalId}`),
  hourly: await scalar(sql`SELECT coalesce(sum(r.eggs), 0)::int AS n FROM counter_hour_rollups r
                           JOIN counters c ON c.id = r.counter_id WHERE c.external_id = ${externalId}`),
});

/** Farm A house's counters, as its counters endpoint lists them. */
const houseCounters = async () =>
  (
    await request(app)
      .get(`/api/v1/houses/${fixture.houseA}/counters`)
      .set('Authorization', integrator)
      .expect(200)
  ).body as {
    id: number;
    externalId: string;
    kind: string;
    row: number | null;
    tier: number | null;
    active: boolean;
  }[];

/** The belt counters at one row and tier of farm A's house (the active one and any retired). */
const countersAt = async (row: number, tier: number) =>
  (await houseCounters()).filter((c) => c.kind === 'belt' && c.row === row && c.tier === tier);

/** Places an unknown counter of farm A, by its id, on a belt of farm A's house. */
const placeOnBelt = async (externalId: string, row: number, tier: number) =>
  place(await idOf(externalId), { houseId: fixture.houseA, kind: 'belt', row, tier });

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db, { events });
  integrator = await bearerFor(app, fixture.usersA.integrator.email);
  const adminB = await bearerFor(app, fixture.adminB.email);
  keyA = await gatewayKeyFor(app, integrator, fixture.farmA, 'Spare gateway');
  keyB = await gatewayKeyFor(app, adminB, fixture.farmB, 'Farm B gateway');
});
afterAll(async () => {
  await database.drop();
});

describe('GET /farms/:farmId/unknown-counters', () => {
  it("lists the farm's unknown counters with their held readings, the latest sender first", async () => {
    await send(keyA, [
      { counter: 'SPARE-1', ts: at(12), eggs: 40 },
      { counter: 'SPARE-1', ts: at(13), eggs: 60 },
      { counter: 'SPARE-2', ts: at(14), eggs: 7 },
    ]);
    await send(keyB, [{ counter: 'FARM-B-ONLY', ts: at(12), eggs: 1 }]);
    const listed = await unknownOf(fixture.farmA);
    expect(listed.map((c) => c.externalId)).toEqual(['SPARE-2', 'SPARE-1']);
    expect(listed[1]).toMatchObject({
      readings: 2,
      eggs: 100,
      firstReadingAt: at(12),
      lastReadingAt: at(13),
    });
  });

  it("is the integrator's and admin's, not the manager's or crew's", async () => {
    const manager = await bearerFor(app, fixture.usersA.manager.email);
    const response = await request(app)
      .get(`/api/v1/farms/${fixture.farmA}/unknown-counters`)
      .set('Authorization', manager);
    expect(response.status).toBe(403);
    const admin = await bearerFor(app, fixture.usersA.admin.email);
    expect((await unknownOf(fixture.farmA, admin)).length).toBeGreaterThan(0);
  });
});

describe('POST /unknown-counters/:counterId/place', () => {
  it('counts the held readings on the chosen belt, rebuilding their rollups once, and replays their days', async () => {
    await send(keyA, [
      { counter: 'SPARE-3', ts: at(11), eggs: 30 },
      // 09:30 UTC on the 11th is 03:30 in Chicago: before lights-on, so still the 10th's production day.
      { counter: 'SPARE-3', ts: at(9, 30, 11), eggs: 20 },
      { counter: 'SPARE-3', ts: at(12, 0, 11), eggs: 50 },
    ]);
    const before = await sectionEggs(2, 3);
    const defaultCounter = (await countersAt(2, 3))[0]!.externalId;
    const heard: DomainEvents['readings.accepted'][] = [];
    const stop = events.on('readings.accepted', (e) => heard.push(e));
    const response = await placeOnBelt('SPARE-3', 2, 3);
    stop();
    expect(response.status).toBe(200);
    expect(response.body).toMatchObject({
      counter: { externalId: 'SPARE-3', kind: 'belt', row: 2, tier: 3, active: true },
      houseId: fixture.houseA,
      // The default counter had never counted: it gives way, and nothing was replaced.
      replacedExternalId: null,
      readings: 3,
      eggs: 100,
      firstDay: '2026-11-10',
      lastDay: '2026-11-11',
    });
    expect(await sectionEggs(2, 3)).toBe(before + 100);
    expect(
      await scalar(sql`SELECT eggs AS n FROM section_day_rollups r JOIN sections s ON s.id = r.section_id
                       WHERE s.house_id = ${fixture.houseA} AND s.row = 2 AND s.tier = 3 AND r.day = '2026-11-10'`),
    ).toBe(50);
    // The hour rollups were written when the readings came; placing rebuilt them, not added them again.
    expect(await rawAndHourly('SPARE-3')).toEqual({ raw: 100, hourly: 100 });
    expect((await countersAt(2, 3)).map((c) => c.externalId)).toEqual(['SPARE-3']);
    expect((await countersAt(2, 3)).map((c) => c.externalId)).not.toContain(defaultCounter);
    expect(heard).toEqual([
      expect.objectContaining({
        farmId: fixture.farmA,
        houseId: fixture.houseA,
        readingsAdded: 3,
        eggsAdded: 100,
        firstTs: new Date(at(11)),
        lastTs: new Date(at(12, 0, 11)),
        replayAllDays: true,
      }),
    ]);
    expect((await unknownOf(fixture.farmA)).map((c) => c.externalId)).not.toContain('SPARE-3');
    expect(
      await scalar(
        sql`SELECT count(*)::int AS n FROM audit_events WHERE action = 'counter.place' AND after->>'kind' = 'belt'`,
      ),
    ).toBe(1);
  });

  it('retires the counter that counted there before, keeping its days in the section', async () => {
    const old = (await countersAt(1, 1))[0]!.externalId;
    await send(keyA, [{ counter: old, ts: at(11, 0, 5), eggs: 500 }]);
    await send(keyA, [{ counter: 'REPLACEMENT-11', ts: at(11, 0, 12), eggs: 480 }]);
    const response = await placeOnBelt('REPLACEMENT-11', 1, 1);
    expect(response.status).toBe(200);
    expect(response.body.replacedExternalId).toBe(old);
    expect(await sectionEggs(1, 1)).toBe(980);
    const atPlace = await countersAt(1, 1);
    expect(atPlace.find((c) => c.externalId === old)?.active).toBe(false);
    expect(atPlace.find((c) => c.externalId === 'REPLACEMENT-11')?.active).toBe(true);
  });

  it('refuses a place whose counter counted during the same hours, changing nothing', async () => {
    const current = (await countersAt(3, 2))[0]!.externalId;
    await send(keyA, [
      { counter: current, ts: at(12, 0, 13), eggs: 90 },
      { counter: 'TWIN-32', ts: at(11, 0, 13), eggs: 80 },
      { counter: 'TWIN-32', ts: at(13, 0, 13), eggs: 85 },
    ]);
    const before = await sectionEggs(3, 2);
    const response = await placeOnBelt('TWIN-32', 3, 2);
    expect(response.status).toBe(409);
    expect(response.body.error.message).toContain(`Counter ${current} at A1, row 3, tier 2`);
    expect(await sectionEggs(3, 2)).toBe(before);
    expect((await unknownOf(fixture.farmA)).map((c) => c.externalId)).toContain('TWIN-32');
  });

  it("places a counter as the house's collector", async () => {
    await send(keyA, [{ counter: 'NEW-COLLECTOR', ts: at(12, 0, 14), eggs: 1234 }]);
    const response = await place(await idOf('NEW-COLLECTOR'), {
      houseId: fixture.houseA,
      kind: 'collector',
    });
    expect(response.status).toBe(200);
    expect(response.body.counter).toMatchObject({ kind: 'collector', row: null, tier: null });
    expect(
      await scalar(sql`SELECT eggs AS n FROM collector_day_rollups
                       WHERE house_id = ${fixture.houseA} AND day = '2026-11-14'`),
    ).toBe(1234);
  });

  it('says which field is wrong for a place the house does not have or a belt without its tier', async () => {
    const id = await idOf('SPARE-2');
    const outside = await place(id, { houseId: fixture.houseA, kind: 'belt', row: 5, tier: 1 });
    expect(outside.status).toBe(400);
    expect(outside.body.error.fields).toEqual([{ path: 'row', message: 'A1 has rows 1 to 4' }]);
    const noTier = await place(id, { houseId: fixture.houseA, kind: 'belt', row: 1 });
    expect(noTier.status).toBe(400);
    expect(noTier.body.error.fields[0]).toMatchObject({
      path: 'tier',
      message: "Choose the belt's tier",
    });
    const collectorWithRow = await place(id, {
      houseId: fixture.houseA,
      kind: 'collector',
      row: 1,
    });
    expect(collectorWithRow.status).toBe(400);
    expect(collectorWithRow.body.error.fields[0].path).toBe('row');
  });

  it("does not place a counter in another farm's house", async () => {
    const response = await place(await idOf('SPARE-2'), {
      houseId: fixture.houseB,
      kind: 'belt',
      row: 1,
      tier: 1,
    });
    expect(response.status).toBe(404);
    expect((await unknownOf(fixture.farmA)).map((c) => c.externalId)).toContain('SPARE-2');
  });

  it('refuses to place a counter twice', async () => {
    const placed = (await houseCounters()).find((c) => c.externalId === 'SPARE-3')!;
    const response = await place(placed.id, {
      houseId: fixture.houseA,
      kind: 'belt',
      row: 4,
      tier: 1,
    });
    expect(response.status).toBe(409);
    expect(response.body.error.message).toBe('Counter SPARE-3 already has a place');
  });

  it('loses and doubles nothing when a batch for the counter arrives while it is being placed', async () => {
    for (let round = 0; round < 4; round++) {
      const name = `RACE-${round}`;
      await send(keyA, [{ counter: name, ts: at(11, 0, 20), eggs: 10 }]);
      const id = await idOf(name);
      const batches = Array.from({ length: 6 }, (_, i) =>
        send(keyA, [{ counter: name, ts: at(11, 5 + i, 20), eggs: 1 }]),
      );
      const [placed] = await Promise.all([
        place(id, {
          houseId: fixture.houseA,
          kind: 'belt',
          row: 4,
          tier: round < 3 ? 1 + round : 3,
        }),
        ...batches,
      ]);
      if (placed.status !== 200) {
        // The last round shares a place with the round before (same hours): refused, still held.
        expect(placed.status).toBe(409);
        continue;
      }
      const section =
        await scalar(sql`SELECT coalesce(sum(r.eggs), 0)::int AS n FROM section_day_rollups r
        JOIN counters c ON c.section_id = r.section_id WHERE c.external_id = ${name}`);
      expect(section, name).toBe(16);
      expect(await rawAndHourly(name), name).toEqual({ raw: 16, hourly: 16 });
    }
  });
});

describe('DELETE /unknown-counters/:counterId', () => {
  it('forgets an unknown counter with its held readings', async () => {
    await send(keyA, [{ counter: 'TYPO-ID', ts: at(12, 0, 15), eggs: 3 }]);
    const id = await idOf('TYPO-ID');
    await request(app)
      .delete(`/api/v1/unknown-counters/${id}`)
      .set('Authorization', integrator)
      .expect(204);
    expect((await unknownOf(fixture.farmA)).map((c) => c.externalId)).not.toContain('TYPO-ID');
    expect(await rawAndHourly('TYPO-ID')).toEqual({ raw: 0, hourly: 0 });
  });

  it('never forgets a placed counter', async () => {
    const placed = (await houseCounters()).find((c) => c.externalId === 'NEW-COLLECTOR')!;
    const response = await request(app)
      .delete(`/api/v1/unknown-counters/${placed.id}`)
      .set('Authorization', integrator);
    expect(response.status).toBe(409);
    expect(await rawAndHourly('NEW-COLLECTOR')).toEqual({ raw: 1234, hourly: 1234 });
  });
});

describe('a new house adopting a held default counter id', () => {
  it('rolls its held readings up once', async () => {
    // The house to be made next gets the next id, and with it this default belt id.
    const admin = await bearerFor(app, fixture.usersA.admin.email);
    const guess = defaultBeltCounterId(fixture.houseB + 1, { row: 1, tier: 1 });
    await send(keyA, [{ counter: guess, ts: at(12, 0, 16), eggs: 77 }]);
    const created = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/houses`)
      .set('Authorization', admin)
      .send({
        name: 'A2',
        rows: 1,
        tiers: 1,
        timezone: 'America/Chicago',
        lightsOn: '04:00',
        photoperiodHours: 16,
      })
      .expect(201);
    expect(created.body.counters.map((c: { externalId: string }) => c.externalId)).toContain(guess);
    expect(await rawAndHourly(guess)).toEqual({ raw: 77, hourly: 77 });
  });
});
