// Longer than ~350 lines on purpose: every ingest rule (keys, duplicates, retries, clocks, limits) against one
// test database, each case a few lines; one file keeps the gateway set-up in one place.
import { createTestDatabase } from '@tierscope/db/testing';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { productionDayOf } from '@tierscope/domain';
import { sql } from 'drizzle-orm';
import { createEventBus, type DomainEvents } from '../../platform/events';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor, gatewayKeyFor } from '../../testing/sign-in';
import { createTestApp } from '../../testing/test-app';
import { dropReadingPartitionsBefore } from './ingest.repository';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let app: ReturnType<typeof createTestApp>;
const events = createEventBus();
let keyA: string;
let keyB: string;
let countersA: {
  id: number;
  externalId: string;
  kind: string;
  row: number | null;
  tier: number | null;
}[];

const post = (key: string, readings: unknown[]) =>
  request(app)
    .post('/api/v1/ingest/readings')
    .set('Authorization', `Bearer ${key}`)
    .send({ readings });

/** A fixed morning so tests never depend on the clock: 2026-11-20 09:00 UTC. */
const at = (minutes: number) => new Date(Date.UTC(2026, 10, 20, 9, minutes)).toISOString();

async function scalar(query: ReturnType<typeof sql>): Promise<number> {
  const result = await database.db.execute<{ n: number | null }>(query);
  return result.rows[0]?.n ?? 0;
}

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  app = createTestApp(database.db, { events });
  const adminA = await bearerFor(app, fixture.usersA.admin.email);
  const adminB = await bearerFor(app, fixture.adminB.email);
  keyA = await gatewayKeyFor(app, adminA, fixture.farmA, 'Barn A gateway');
  keyB = await gatewayKeyFor(app, adminB, fixture.farmB, 'Barn B gateway');
  countersA = (
    await request(app).get(`/api/v1/houses/${fixture.houseA}/counters`).set('Authorization', adminA)
  ).body;
  // Readings in November 2026 need its partition; the service makes missing ones itself.
});
afterAll(async () => {
  await database.drop();
});

const belt = (row: number, tier: number) =>
  countersA.find((c) => c.row === row && c.tier === tier)!.externalId;
const collector = () => countersA.find((c) => c.kind === 'collector')!.externalId;

describe('POST /api/v1/ingest/readings', () => {
  it('keeps a batch and says how many readings it accepted', async () => {
    const received: DomainEvents['readings.accepted'][] = [];
    const stop = events.on('readings.accepted', (e) => received.push(e));
    const response = await post(keyA, [
      { counter: belt(1, 1), ts: at(0), eggs: 120 },
      { counter: belt(1, 2), ts: at(0), eggs: 110 },
      { counter: collector(), ts: at(0), eggs: 230 },
    ]);
    stop();
    expect(response.status).toBe(200);
    expect(response.body).toEqual({
      accepted: 3,
      duplicates: 0,
      rejected: [],
      unmappedCounters: [],
    });
    expect(await scalar(sql`select sum(eggs)::int as n from readings`)).toBe(460);
    // One event for the one house touched, with only the new readings in it.
    expect(received).toEqual([
      expect.objectContaining({
        farmId: fixture.farmA,
        houseId: fixture.houseA,
        readingsAdded: 3,
        eggsAdded: 460,
      }),
    ]);
  });

  it('counts a re-sent batch once: the second time everything is a duplicate', async () => {
    const batch = [
      { counter: belt(2, 1), ts: at(5), eggs: 40 },
      { counter: belt(2, 2), ts: at(5), eggs: 41 },
    ];
    expect((await post(keyA, batch)).body.accepted).toBe(2);
    const before = await scalar(sql`select sum(eggs)::int as n from section_day_rollups`);
    const again = await post(keyA, batch);
    expect(again.body).toMatchObject({ accepted: 0, duplicates: 2 });
    expect(await scalar(sql`select sum(eggs)::int as n from section_day_rollups`)).toBe(before);
  });

  it('counts a reading repeated inside one batch once', async () => {
    const reading = { counter: belt(3, 1), ts: at(10), eggs: 9 };
    const response = await post(keyA, [
      reading,
      reading,
      { ...reading, ts: at(10).replace('Z', '+00:00') },
    ]);
    expect(response.body).toMatchObject({ accepted: 1, duplicates: 2 });
  });

  it('takes readings out of order', async () => {
    const response = await post(keyA, [
      { counter: belt(4, 1), ts: at(30), eggs: 3 },
      { counter: belt(4, 1), ts: at(10), eggs: 1 },
      { counter: belt(4, 1), ts: at(20), eggs: 2 },
    ]);
    expect(response.body.accepted).toBe(3);
    const id = countersA.find((c) => c.externalId === belt(4, 1))!.id;
    const rows = await database.db.execute<{ eggs: number }>(
      sql`select eggs from readings where counter_id = ${id} order by ts`,
    );
    expect(rows.rows.map((r) => r.eggs)).toEqual([1, 2, 3]);
  });

  it('turns running totals into intervals and treats a lower total as a counter reset', async () => {
    const counter = belt(1, 3);
    const response = await post(
      keyA,
      [100, 130, 160, 20, 50].map((total, i) => ({ counter, ts: at(i * 5), total })),
    );
    expect(response.body.accepted).toBe(5);
    const id = countersA.find((c) => c.externalId === counter)!.id;
    const rows = await database.db.execute<{ eggs: number }>(
      sql`select eggs from readings where counter_id = ${id} order by ts`,
    );
    // The first total is the baseline (0); 160 → 20 is a reset, so 20 eggs, never −140.
    expect(rows.rows.map((r) => r.eggs)).toEqual([0, 30, 30, 20, 30]);
  });

  it('reads a total that steps back a little as a glitch: no phantom eggs, in one batch or across two', async () => {
    const counter = belt(3, 3);
    const id = countersA.find((c) => c.externalId === counter)!.id;
    await post(keyA, [
      { counter, ts: at(0), total: 1000 },
      { counter, ts: at(5), total: 1030 },
      { counter, ts: at(10), total: 1029 },
    ]);
    await post(keyA, [{ counter, ts: at(15), total: 1035 }]);
    const rows = await database.db.execute<{ eggs: number }>(
      sql`select eggs from readings where counter_id = ${id} order by ts`,
    );
    // Before: 1030 → 1029 was a reset, 1,029 phantom eggs. Now 0, and 1035 counts 5 from 1030.
    expect(rows.rows.map((r) => r.eggs)).toEqual([0, 30, 0, 5]);
  });

  it('recounts the next stored total when a total arrives late', async () => {
    const counter = belt(2, 3);
    const id = countersA.find((c) => c.externalId === counter)!.id;
    await post(keyA, [
      { counter, ts: at(0), total: 1000 },
      { counter, ts: at(20), total: 1060 },
    ]);
    await post(keyA, [{ counter, ts: at(10), total: 1025 }]);
    const rows = await database.db.execute<{ eggs: number }>(
      sql`select eggs from readings where counter_id = ${id} order by ts`,
    );
    expect(rows.rows.map((r) => r.eggs)).toEqual([0, 25, 35]);
    const hourly = await scalar(
      sql`select sum(eggs)::int as n from counter_hour_rollups where counter_id = ${id}`,
    );
    expect(hourly).toBe(60);
  });

  it('lands the good readings of a mixed batch and lists each bad one with its index and reason', async () => {
    const response = await post(keyA, [
      { counter: belt(4, 2), ts: at(0), eggs: 12 },
      { counter: belt(4, 2), ts: new Date(Date.now() + 10 * 60_000).toISOString(), eggs: 1 },
      { counter: belt(4, 2), ts: at(1), eggs: -3 },
      { counter: belt(4, 2), ts: at(2), eggs: 2.5 },
      { counter: belt(4, 2), ts: at(3), eggs: 1, total: 5 },
      { counter: belt(4, 2), ts: at(4) },
      { counter: belt(4, 2), ts: '2026-11-20 09:00', eggs: 1 },
      'not a reading',
      { counter: belt(4, 3), ts: at(0), eggs: 13 },
    ]);
    expect(response.status).toBe(200);
    expect(response.body.accepted).toBe(2);
    expect(response.body.rejected.map((r: { index: number }) => r.index)).toEqual([
      1, 2, 3, 4, 5, 6, 7,
    ]);
    const reasons = response.body.rejected.map((r: { reason: string }) => r.reason);
    expect(reasons[0]).toMatch(/future/);
    expect(reasons[1]).toMatch(/negative/);
    expect(reasons[2]).toMatch(/whole number/);
    expect(reasons[3]).toMatch(/either eggs or total/);
    expect(reasons[4]).toMatch(/either eggs or total/);
    expect(reasons[5]).toMatch(/ISO-8601/);
  });

  it('keeps readings of an unknown counter as an unmapped counter and says so', async () => {
    const response = await post(keyA, [{ counter: 'NEW-BELT-77', ts: at(0), eggs: 5 }]);
    expect(response.body).toMatchObject({ accepted: 1, unmappedCounters: ['NEW-BELT-77'] });
    const held = await scalar(
      sql`select count(*)::int as n from readings r join counters c on c.id = r.counter_id where c.external_id = 'NEW-BELT-77' and c.house_id is null`,
    );
    expect(held).toBe(1);
  });

  it('refuses a batch of more than 10,000 readings with 413 and keeps none of it', async () => {
    const before = await scalar(sql`select count(*)::int as n from readings`);
    const readings = Array.from({ length: 10_001 }, (_, i) => ({
      counter: belt(3, 2),
      ts: new Date(Date.UTC(2026, 10, 1) + i * 1000).toISOString(),
      eggs: 1,
    }));
    const response = await post(keyA, readings);
    expect(response.status).toBe(413);
    expect(await scalar(sql`select count(*)::int as n from readings`)).toBe(before);
  });

  it('refuses a body over the size limit with 413', async () => {
    const huge = 'x'.repeat(5 * 1024 * 1024);
    const response = await post(keyA, [{ counter: huge, ts: at(0), eggs: 1 }]);
    expect(response.status).toBe(413);
  });

  it("never lets one farm's key write into another farm", async () => {
    const farmABefore = await scalar(
      sql`select count(*)::int as n from readings where farm_id = ${fixture.farmA}`,
    );
    const response = await post(keyB, [{ counter: belt(1, 1), ts: at(45), eggs: 999 }]);
    // Farm B has no counter of that id: it is held as farm B's unmapped counter, not farm A's.
    expect(response.body.unmappedCounters).toEqual([belt(1, 1)]);
    expect(
      await scalar(sql`select count(*)::int as n from readings where farm_id = ${fixture.farmA}`),
    ).toBe(farmABefore);
  });

  it('refuses a revoked key', async () => {
    const admin = await bearerFor(app, fixture.usersA.admin.email);
    const created = await request(app)
      .post(`/api/v1/farms/${fixture.farmA}/gateways`)
      .set('Authorization', admin)
      .send({ name: 'Old gateway' });
    expect(
      (await post(created.body.key, [{ counter: belt(1, 1), ts: at(50), eggs: 1 }])).status,
    ).toBe(200);
    await request(app)
      .post(`/api/v1/gateways/${created.body.id}/revoke`)
      .set('Authorization', admin)
      .expect(200);
    const response = await post(created.body.key, [{ counter: belt(1, 1), ts: at(51), eggs: 1 }]);
    expect(response.status).toBe(401);
  });

  it('refuses user tokens, and gateway keys anywhere but ingest', async () => {
    const manager = await bearerFor(app, fixture.usersA.manager.email);
    const asUser = await request(app)
      .post('/api/v1/ingest/readings')
      .set('Authorization', manager)
      .send({ readings: [] });
    expect(asUser.status).toBe(401);
    const asGateway = await request(app)
      .get('/api/v1/farms')
      .set('Authorization', `Bearer ${keyA}`);
    expect(asGateway.status).toBe(401);
    const noKey = await request(app).post('/api/v1/ingest/readings').send({ readings: [] });
    expect(noKey.status).toBe(401);
  });

  it('answers a malformed envelope with 400', async () => {
    const response = await request(app)
      .post('/api/v1/ingest/readings')
      .set('Authorization', `Bearer ${keyA}`)
      .send({ readings: 'lots' });
    expect(response.status).toBe(400);
  });
});

describe('rollups', () => {
  it('equal the sum of their raw readings after a messy replay', async () => {
    // Deterministic shuffle (a small LCG) so a failure can be replayed.
    let seed = 42;
    const random = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    const belts = countersA.filter((c) => c.kind === 'belt').map((c) => c.externalId);
    const all: { counter: string; ts: string; eggs?: number; total?: number }[] = [];
    // Two production days either side of lights-on (04:00 Chicago = 10:00 UTC in November).
    for (let step = 0; step < 96; step++) {
      const ts = new Date(Date.UTC(2026, 10, 21, 8) + step * 15 * 60_000).toISOString();
      for (const c of belts.slice(0, 6))
        all.push({ counter: c, ts, eggs: Math.floor(random() * 50) });
      all.push({ counter: collector(), ts, eggs: Math.floor(random() * 300) });
    }
    let total = 0;
    const totalCounter = belts[7]!;
    for (let step = 0; step < 40; step++) {
      total = step === 25 ? 3 : total + Math.floor(random() * 20);
      all.push({
        counter: totalCounter,
        ts: new Date(Date.UTC(2026, 10, 21, 9) + step * 30 * 60_000).toISOString(),
        total,
      });
    }
    const shuffled = [...all].sort(() => random() - 0.5);
    const batches: (typeof all)[] = [];
    for (let i = 0; i < shuffled.length; i += 97) batches.push(shuffled.slice(i, i + 97));
    // Replay: every batch twice, some overlapping, concurrently in pairs.
    for (let i = 0; i < batches.length; i += 2) {
      const pair = batches.slice(i, i + 2);
      await Promise.all([...pair, ...pair].map((b) => post(keyA, b)));
      if (i > 0) await post(keyA, [...batches[i - 1]!.slice(0, 20), ...pair[0]!.slice(0, 20)]);
    }
    const mismatchedHours = await scalar(sql`
      with raw as (select farm_id, counter_id, date_trunc('hour', ts) as hour, sum(eggs)::int as eggs from readings group by 1, 2, 3)
      select count(*)::int as n from raw full join counter_hour_rollups r using (farm_id, counter_id, hour)
      where raw.eggs is distinct from r.eggs`);
    expect(mismatchedHours).toBe(0);
    const mismatchedSectionDays = await scalar(sql`
      with raw as (
        select r.farm_id, c.section_id, ((r.ts at time zone h.timezone) - h.lights_on::interval)::date as day, sum(r.eggs)::int as eggs
        from readings r join counters c on c.id = r.counter_id join houses h on h.id = c.house_id
        where c.kind = 'belt' and c.section_id is not null group by 1, 2, 3)
      select count(*)::int as n from raw full join section_day_rollups r using (farm_id, section_id, day)
      where raw.eggs is distinct from r.eggs`);
    expect(mismatchedSectionDays).toBe(0);
    const mismatchedCollectorDays = await scalar(sql`
      with raw as (
        select r.farm_id, c.house_id, ((r.ts at time zone h.timezone) - h.lights_on::interval)::date as day, sum(r.eggs)::int as eggs
        from readings r join counters c on c.id = r.counter_id join houses h on h.id = c.house_id
        where c.kind = 'collector' group by 1, 2, 3)
      select count(*)::int as n from raw full join collector_day_rollups r using (farm_id, house_id, day)
      where raw.eggs is distinct from r.eggs`);
    expect(mismatchedCollectorDays).toBe(0);
    // And nothing was lost or doubled: the database holds exactly the distinct interval readings sent.
    const sentIntervals = new Map(
      all.filter((r) => r.eggs !== undefined).map((r) => [`${r.counter}|${r.ts}`, r.eggs!]),
    );
    const expected = [...sentIntervals.values()].reduce((a, b) => a + b, 0);
    const stored =
      await scalar(sql`select sum(r.eggs)::int as n from readings r join counters c on c.id = r.counter_id
      where r.ts >= '2026-11-21T08:00Z' and c.external_id <> ${totalCounter}`);
    expect(stored).toBe(expected);
  });

  it('puts a reading before lights-on into the previous production day', async () => {
    // 09:30 UTC on 2026-11-25 is 03:30 in Chicago, before the 04:00 lights-on: it belongs to the 24th.
    const counter = countersA.find((c) => c.row === 3 && c.tier === 3)!;
    await post(keyA, [
      { counter: counter.externalId, ts: '2026-11-25T09:30:00Z', eggs: 7 },
      { counter: counter.externalId, ts: '2026-11-25T10:30:00Z', eggs: 11 },
    ]);
    const days = await database.db.execute<{ day: string; eggs: number }>(sql`
      select day::text, eggs from section_day_rollups d join counters c on c.section_id = d.section_id
      where c.id = ${counter.id} and day between '2026-11-24' and '2026-11-25' order by day`);
    expect(days.rows).toEqual([
      { day: '2026-11-24', eggs: 7 },
      { day: '2026-11-25', eggs: 11 },
    ]);
  });
});

describe('production days', () => {
  it('agree between the database rollups and the domain rule across a daylight-saving change', async () => {
    // US clocks went forward on 2026-03-08; lights-on stays at 04:00 local (10:00 UTC before, 09:00 UTC after).
    const counter = countersA.find((c) => c.row === 4 && c.tier === 3)!;
    const instants = [
      '2026-03-07T09:55:00Z',
      '2026-03-07T10:05:00Z',
      '2026-03-08T08:55:00Z',
      '2026-03-08T09:05:00Z',
      '2026-03-09T08:59:00Z',
    ];
    await post(
      keyA,
      instants.map((ts, i) => ({ counter: counter.externalId, ts, eggs: 10 ** i })),
    );
    const rows = await database.db.execute<{ day: string; eggs: number }>(sql`
      select day::text, eggs from section_day_rollups d join counters c on c.section_id = d.section_id
      where c.id = ${counter.id} and day between '2026-03-01' and '2026-03-31' order by day`);
    const expected = new Map<string, number>();
    instants.forEach((ts, i) => {
      const day = productionDayOf(new Date(ts), 'America/Chicago', '04:00');
      expected.set(day, (expected.get(day) ?? 0) + 10 ** i);
    });
    expect(rows.rows).toEqual([...expected].map(([day, eggs]) => ({ day, eggs })));
    // And the rule itself: 08:55 UTC on the 8th is 03:55 CDT, still the 7th's production day.
    expect(expected.get('2026-03-07')).toBe(10 + 100);
  });
});

describe('retention', () => {
  it('drops old months of raw readings while their rollups stay', async () => {
    const counter = belt(3, 2);
    await post(keyA, [{ counter, ts: '2025-03-10T12:00:00Z', eggs: 77 }]);
    const id = countersA.find((c) => c.externalId === counter)!.id;
    expect(
      await scalar(
        sql`select count(*)::int as n from readings where counter_id = ${id} and ts < '2025-06-01'`,
      ),
    ).toBe(1);
    const dropped = await dropReadingPartitionsBefore(database.db, '2025-06-01');
    expect(dropped).toContain('readings_2025_03');
    expect(
      await scalar(
        sql`select count(*)::int as n from readings where counter_id = ${id} and ts < '2025-06-01'`,
      ),
    ).toBe(0);
    expect(
      await scalar(
        sql`select sum(eggs)::int as n from counter_hour_rollups where counter_id = ${id} and hour < '2025-06-01'`,
      ),
    ).toBe(77);
    // Newer months are untouched.
    expect(
      await scalar(sql`select count(*)::int as n from readings where ts >= '2026-11-01'`),
    ).toBeGreaterThan(0);
  });
});
