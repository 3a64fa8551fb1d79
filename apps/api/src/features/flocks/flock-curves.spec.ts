import { insertHouseWithLayout, schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import {
  addDays,
  compartmentalLay,
  judgeHouseDipAgainstCurve,
  productionDayOf,
} from '@tierscope/domain';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createEventBus } from '../../platform/events';
import { createEvaluationService } from '../evaluation/evaluation.service';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { createFlockCurves } from './flock-curves';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
const CURVE = { a: 100, b: 0.004, c: 0.5, d: 18 };
const HENS = 12_000;
let yesterday: string;

/** A house of farm A whose flock lays on the curve, except its last eight days at 92 % of it. */
async function houseWithFlock(name: string): Promise<number> {
  const db = database.db;
  const house = await insertHouseWithLayout(db, fixture.farmA, {
    name,
    rows: 4,
    tiers: 3,
    timezone: 'America/Chicago',
    lightsOn: '04:00',
    photoperiodHours: 16,
    shortfallThresholdPct: 10,
  });
  const placedOn = addDays(yesterday, -90);
  await db.insert(schema.flocks).values({
    houseId: house.id,
    placedOn,
    hensHoused: HENS,
    ageAtPlacementWeeks: 18,
  });
  const sections = await db
    .select()
    .from(schema.sections)
    .where(eq(schema.sections.houseId, house.id));
  const rows = [];
  for (let i = 0; i <= 90; i++) {
    const day = addDays(placedOn, i);
    const onCurve = (HENS * compartmentalLay(18 + Math.floor(i / 7), CURVE)) / 100;
    const eggs = day > addDays(yesterday, -8) ? onCurve * 0.92 : onCurve;
    for (const s of sections) {
      rows.push({
        farmId: fixture.farmA,
        sectionId: s.id,
        day,
        eggs: Math.round(eggs / sections.length),
      });
    }
  }
  for (let i = 0; i < rows.length; i += 2000) {
    await db.insert(schema.sectionDayRollups).values(rows.slice(i, i + 2000));
  }
  return house.id;
}

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  yesterday = addDays(productionDayOf(new Date(), 'America/Chicago', '04:00'), -1);
});
afterAll(async () => {
  await database.drop();
});

describe('judgeHouseDipAgainstCurve', () => {
  it('is a dip more than 5 % below the curve, not at 5 % or less', () => {
    expect(judgeHouseDipAgainstCurve(85, 90).isDip).toBe(true);
    expect(judgeHouseDipAgainstCurve(85.6, 90).isDip).toBe(false);
  });
});

describe('the house dip with a fitted lay curve', () => {
  it('expects what the flock’s curve says at its age', async () => {
    const houseId = await houseWithFlock('Curve A');
    const curves = createFlockCurves(database.db);
    const expected = await curves.expectedHenDayPct(houseId, yesterday);
    // 90 days after placement at 18 weeks: week 30 of age.
    expect(expected).not.toBeNull();
    expect(Math.abs(expected! - compartmentalLay(30, CURVE))).toBeLessThan(4);
  });

  it('forgets its fit when the flock changes, in every process (the flock.changed event)', async () => {
    const houseId = await houseWithFlock('Curve D');
    const events = createEventBus();
    const curves = createFlockCurves(database.db, events);
    expect(await curves.expectedHenDayPct(houseId, yesterday)).not.toBeNull();
    // The flock ended before yesterday (recorded by any process): there is no flock to expect from.
    await database.db
      .update(schema.flocks)
      .set({ endedOn: addDays(yesterday, -2) })
      .where(eq(schema.flocks.houseId, houseId));
    // Without the event the fit made before is still answered…
    expect(await curves.expectedHenDayPct(houseId, yesterday)).not.toBeNull();
    // …after it (as the cluster bus delivers it from any process) the house is fitted again.
    events.emit('flock.changed', { farmId: fixture.farmA, houseId });
    expect(await curves.expectedHenDayPct(houseId, yesterday)).toBeNull();
  });

  it('flags a week-long 8 % drop that the 7-day average has already absorbed', async () => {
    const withCurve = await houseWithFlock('Curve B');
    const without = await houseWithFlock('Curve C');
    const events = createEventBus();
    const curved = createEvaluationService(database.db, events, createFlockCurves(database.db));
    const plain = createEvaluationService(database.db, events);
    const dips = (changed: { kind: string }[]) => changed.filter((e) => e.kind === 'house_dip');
    expect(dips((await curved.evaluateNow(withCurve)).changed)).toHaveLength(1);
    // The same flock judged by its 7-day average alone: yesterday looks like the days before it.
    expect(dips((await plain.evaluateNow(without)).changed)).toHaveLength(0);
  });
});
