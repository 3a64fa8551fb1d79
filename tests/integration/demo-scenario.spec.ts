import { exceptionSchema } from '@tierscope/contracts';
import { schema } from '@tierscope/db';
import { DEMO_PASSWORD, DEMO_TIMEZONE, demoFlocks, seedDemo } from '@tierscope/db/seed';
import { createTestDatabase } from '@tierscope/db/testing';
import { addDays, productionDayOf, productionDayStart } from '@tierscope/domain';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import type { Runtime } from '../../apps/api/src/app';
import { bearerFor, gatewayKeyFor, postReadings } from '../../apps/api/src/testing/sign-in';
import { createTestApp, createTestRuntime } from '../../apps/api/src/testing/test-app';
import {
  DEMO_FAULTS,
  DEMO_SIMULATOR_SEED,
  simulatorHouseOf,
  writeDemoHistory,
} from '../../scripts/demo-history';
import { parseFault } from '../../simulator/src/faults';
import type { Reading } from '../../simulator/src/house-model';
import { RealisticHouseModel } from '../../simulator/src/realistic-model';

/**
 * The demo scenario through the API, on the realistic simulator (binomial counts, day-to-day section and
 * house noise, persistent section differences, lay times after lights-on, faults with realistic shapes):
 * the demo's seed, its older history as daily totals, 14 days of 15-minute readings posted through the
 * gateway API, and every day replayed by the engine as `npm start` does. The three planted faults are found
 * as what they are, and nothing else is raised in 5 houses × 14 days. The start is fixed so the run is the
 * same every time; its 14 days include the day US clocks go back (2026-11-01), a 25-hour production day.
 */
const START = new Date('2026-11-10T16:00:00Z');
const DAYS = 14;
const SLOT_MS = 15 * 60_000;

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let runtime: Runtime;
let app: ReturnType<typeof createTestApp>;
let admin: string;
let firstDay: string;

beforeAll(async () => {
  database = await createTestDatabase();
  const { db } = database;
  await seedDemo(db, START.toISOString().slice(0, 10));
  // As `npm start` does: the readings start at the lights-on of the production day 14 days back, and the
  // daily totals end the day before (no day is half history, half readings).
  const [first] = await db.select().from(schema.houses);
  const zone = first?.timezone ?? DEMO_TIMEZONE;
  const lightsOn = first?.lightsOn ?? '04:00';
  firstDay = productionDayOf(new Date(START.getTime() - DAYS * 86_400_000), zone, lightsOn);
  const backfillFrom = productionDayStart(firstDay, zone, lightsOn);
  // The morning walks go on to yesterday, as `npm start` writes them.
  await writeDemoHistory(
    db,
    addDays(firstDay, -1),
    START,
    addDays(productionDayOf(START, zone, lightsOn), -1),
  );
  runtime = createTestRuntime(db);
  app = createTestApp(db, { runtime });
  admin = await bearerFor(app, 'admin@bramblewood.test', DEMO_PASSWORD);

  const flocks = await demoFlocks(db, START);
  const faults = DEMO_FAULTS.map((spec) => parseFault(spec, START));
  const houses = await db.select().from(schema.houses);
  const sections = await db.select().from(schema.sections);
  const counters = await db.select().from(schema.counters);
  for (const farm of await db.select().from(schema.farms)) {
    const key = await gatewayKeyFor(app, admin, farm.id, 'Demo simulator');
    const models = houses
      .filter((h) => h.farmId === farm.id)
      .map((h) => {
        const house = simulatorHouseOf(h, sections, counters, {
          hensHoused: flocks.get(h.id)?.hensHoused ?? 30_000,
          flockAgeWeeks: flocks.get(h.id)?.flockAgeWeeks ?? 30,
        });
        return new RealisticHouseModel(house, { seed: DEMO_SIMULATOR_SEED, start: START, faults });
      });
    const readings: Reading[] = [];
    for (let t = backfillFrom.getTime() + SLOT_MS; t <= START.getTime(); t += SLOT_MS)
      for (const model of models)
        readings.push(...model.readingsFor(new Date(t - SLOT_MS), new Date(t)));
    await postReadings(app, key, readings);
  }
  // Every day replayed, as the scheduler does after a backfill: checkpoints and complete days in order.
  // The day under way at START is left to the live evaluation (a replay judges whole days and checkpoints).
  for (const house of houses) {
    await runtime.evaluation.evaluateHistory(
      house.id,
      firstDay,
      addDays(productionDayOf(START, house.timezone, house.lightsOn), -1),
    );
  }
}, 600_000);

afterAll(async () => {
  await database.drop();
});

describe('the demo scenario on the realistic simulator', () => {
  it('finds the three planted faults as what they are, and raises nothing else', async () => {
    const response = await request(app).get('/api/v1/exceptions').set('Authorization', admin);
    expect(response.status).toBe(200);
    const all = z.array(exceptionSchema).parse(response.body);
    const found = all
      .map((e) => `${e.houseName} ${e.kind} ${e.scope} ${e.row ?? '-'}:${e.tier ?? '-'}`)
      .sort();
    expect(found).toEqual([
      // The dead counter: a counter matter only (no shortfall, collector gap or house dip beside it).
      'House 2 shortfall row 4:-',
      'House 3 silent_counter section 2:1',
      'House A shortfall tier -:3',
    ]);
  });

  it('has every flock walked every morning up to yesterday, so no flock page warns of missing walks', async () => {
    const today = productionDayOf(START, DEMO_TIMEZONE, '04:00');
    for (const flock of await database.db.select().from(schema.flocks)) {
      const response = await request(app)
        .get(`/api/v1/flocks/${flock.id}/production`)
        .set('Authorization', admin);
      expect(response.status).toBe(200);
      const house = response.body.houseName as string;
      const days = (response.body.days as { day: string; isWalkRecorded: boolean }[]).filter(
        (d) => d.day < today,
      );
      expect(days.length, house).toBeGreaterThan(14);
      expect(
        days.filter((d) => !d.isWalkRecorded).map((d) => d.day),
        house,
      ).toEqual([]);
    }
  });
});
