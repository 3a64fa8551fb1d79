import { insertHouseWithLayout, schema } from '@tierscope/db';
import { createTestDatabase } from '@tierscope/db/testing';
import { lastCountedAt } from './evaluation.repository';
import { addDays } from '@tierscope/domain';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Runtime } from '../../app';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor, gatewayKeyFor, postReadings } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';
import { countersOfHouse } from '../houses/houses.repository';
import { readEvaluation } from './evaluation-state.repository';

/**
 * One cause, one alarm, on the real database: a dead belt counter is a silent counter only (no shortfall of
 * its section, row or tier, no collector gap, no house dip), and a short tier is a tier shortfall only (no
 * house dip). House A1: 4 rows × 3 tiers, America/Chicago, lights on at 04:00 (10:00 UTC in November).
 * Counts carry a little day-to-day wobble (seeded), never identical days.
 */
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let runtime: Runtime;
let app: ReturnType<typeof createTestApp>;
let key: string;
let counters: Awaited<ReturnType<typeof countersOfHouse>>;

const DAY0 = Date.UTC(2026, 10, 2, 10);
const HOUR = 3_600_000;
const DAYS = 10;

function wobble(seed: number): number {
  // A small deterministic wobble of ± 2 % (a sine hash: enough to make days differ, the same every run).
  return 1 + 0.02 * Math.sin(seed * 12.9898) * Math.cos(seed * 78.233);
}

function hours(
  fromHour: number,
  toHour: number,
  adjust: (row: number, tier: number, hour: number) => number,
  list = counters,
  /** the lights-on of hour 0 */
  day0 = DAY0,
): { counter: string; ts: string; eggs: number }[] {
  const readings: { counter: string; ts: string; eggs: number }[] = [];
  for (let h = fromHour; h < toHour; h++) {
    if (h % 24 >= 16) continue;
    const ts = new Date(day0 + (h + 1) * HOUR).toISOString();
    let laid = 0;
    for (const c of list.filter((x) => x.kind === 'belt')) {
      const day = Math.floor(h / 24);
      const base = [90, 120, 105][c.tier! - 1]! * wobble(day * 100 + c.row! * 10 + c.tier!);
      const eggs = Math.round(base * adjust(c.row!, c.tier!, h));
      laid += Math.round(
        base * (adjust(c.row!, c.tier!, h) === 0 ? 1 : adjust(c.row!, c.tier!, h)),
      );
      readings.push({ counter: c.externalId, ts, eggs });
    }
    readings.push({
      counter: list.find((x) => x.kind === 'collector')!.externalId,
      ts,
      eggs: laid,
    });
  }
  return readings;
}

function ingest(readings: { counter: string; ts: string; eggs: number }[], gateway = key) {
  return postReadings(app, gateway, readings);
}

async function openExceptions(houseId = fixture.houseA) {
  const rows = await database.db.execute<{
    kind: string;
    scope: string;
    row: number | null;
    tier: number | null;
  }>(
    sql`select kind, scope, row, tier from exceptions where house_id = ${houseId}
        and status <> 'closed' order by kind, scope, row, tier`,
  );
  return rows.rows.map((r) => `${r.kind} ${r.scope} ${r.row ?? '-'}:${r.tier ?? '-'}`);
}

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  runtime = createTestRuntime(database.db);
  app = createTestApp(database.db, { runtime });
  key = await gatewayKeyFor(app, await bearerFor(app, fixture.usersA.admin.email), fixture.farmA);
  counters = await countersOfHouse(database.db, fixture.houseA);
  await ingest(hours(0, (DAYS - 1) * 24, () => 1));
});
afterAll(async () => {
  await database.drop();
});

describe('one cause, one alarm', () => {
  it('a dead belt counter is a silent counter only: no shortfall, collector gap or house dip', async () => {
    // Row 3 tier 1 counts nothing from the start of day 9 (yesterday) on; its eggs still reach the collector.
    const dead = (row: number, tier: number) => (row === 3 && tier === 1 ? 0 : 1);
    await ingest(hours((DAYS - 1) * 24, DAYS * 24 + 10, dead));
    const now = new Date(DAY0 + DAYS * 24 * HOUR + 10 * HOUR);
    await runtime.evaluation.evaluateNow(fixture.houseA, new Date(now.getTime() - 60_000));
    await runtime.evaluation.evaluateNow(fixture.houseA, now);
    expect(await openExceptions()).toEqual(['silent_counter section 3:1']);
    // It says what the counter usually counts in the window, not "0 of 0".
    const [silent] = (
      await database.db.execute<{ expected: number }>(
        sql`select expected from exceptions where kind = 'silent_counter' and house_id = ${fixture.houseA}`,
      )
    ).rows;
    expect(silent?.expected).toBeGreaterThan(14);
  });

  it("finds a dead counter's last counted egg, so its cell says since when it is silent", async () => {
    // Dead from the start of day 9: its last eggs were in day 8's last light hour (hour 15, read at 16).
    expect(
      await lastCountedAt(database.db, fixture.farmA, fixture.houseA, 3, 1, new Date(DAY0)),
    ).toEqual(new Date(DAY0 + (8 * 24 + 16) * HOUR));
    // Its neighbour counted up to the newest reading; a look-back after that finds nothing.
    const newest = new Date(DAY0 + (DAYS * 24 + 10) * HOUR);
    expect(
      await lastCountedAt(database.db, fixture.farmA, fixture.houseA, 3, 2, new Date(DAY0)),
    ).toEqual(newest);
    expect(
      await lastCountedAt(database.db, fixture.farmA, fixture.houseA, 3, 2, newest),
    ).toBeNull();
  });

  it('a late gateway is neither a silent counter nor a shortfall: its checkpoint waits for the data', async () => {
    // House B1 (farm B, its own gateway): nine clean days, then on day 10 row 2's readings stop after the
    // third hour of light while the other rows' keep coming — what a second gateway running late looks like.
    const keyB = await gatewayKeyFor(
      app,
      await bearerFor(app, fixture.adminB.email),
      fixture.farmB,
    );
    const countersB = await countersOfHouse(database.db, fixture.houseB);
    await ingest(
      hours(0, (DAYS - 1) * 24, () => 1, countersB),
      keyB,
    );
    const today = (DAYS - 1) * 24;
    const onTime = hours(today, today + 11, () => 1, countersB);
    const rowTwo = new Set(
      countersB.filter((c) => c.kind === 'belt' && c.row === 2).map((c) => c.externalId),
    );
    const cut = new Date(DAY0 + (today + 3) * HOUR).toISOString();
    await ingest(
      onTime.filter((r) => !rowTwo.has(r.counter) || r.ts <= cut),
      keyB,
    );
    // Ten hours and a few minutes into the day: both checkpoints have passed, row 2's data is 7 hours late.
    const now = new Date(DAY0 + (today + 10) * HOUR + 5 * 60_000);
    await runtime.evaluation.evaluateNow(fixture.houseB, new Date(now.getTime() - 60_000));
    await runtime.evaluation.evaluateNow(fixture.houseB, now);
    expect(await openExceptions(fixture.houseB)).toEqual([]);
    // The map says which sections' data is late, and up to when it has counted.
    const map = await runtime.evaluation.buildMap(fixture.houseB, 'today', now);
    const late = map?.cells.filter((c) => c.isDataLate).map((c) => `${c.row}:${c.tier}`);
    expect(late).toEqual(['2:1', '2:2', '2:3']);
    expect(map?.cells.find((c) => c.row === 2 && c.tier === 1)?.dataUntil).toBe(cut);
    // The backlog arrives: the waiting checkpoints are judged on the whole data, and nothing is short.
    await ingest(onTime, keyB);
    await runtime.evaluation.evaluateNow(fixture.houseB, new Date(now.getTime() + 60_000));
    expect(await openExceptions(fixture.houseB)).toEqual([]);
    const engine = (
      await database.db.execute<{ engine: { checkpoints?: number[] } }>(
        sql`select engine from house_evaluations where house_id = ${fixture.houseB}`,
      )
    ).rows[0]?.engine;
    expect(engine?.checkpoints).toEqual([0, 1]);
  });

  it('a gateway that goes quiet part way through a day is data late: no house dip, replayed or live', async () => {
    // House C1 (UTC, lights on at midnight, a flock of 2,000): ten whole days up to the day before
    // yesterday, then yesterday's readings stop after its third hour of light — the gateway went quiet
    // and has not come back. The readings are dated from today, so the replay runs up to today as the
    // scheduler's does and the live evaluation carries on from it.
    const house = await insertHouseWithLayout(database.db, fixture.farmA, {
      name: 'C1',
      rows: 4,
      tiers: 3,
      timezone: 'UTC',
      lightsOn: '00:00',
      photoperiodHours: 16,
      shortfallThresholdPct: 10,
    });
    const today = new Date().toISOString().slice(0, 10);
    await database.db.insert(schema.flocks).values({
      houseId: house.id,
      placedOn: addDays(today, -200),
      hensHoused: 2000,
      ageAtPlacementWeeks: 18,
    });
    const countersC = await countersOfHouse(database.db, house.id);
    const day0 = Date.parse(`${addDays(today, -11)}T00:00:00Z`);
    await ingest([
      ...hours(0, 10 * 24, () => 1, countersC, day0),
      ...hours(10 * 24, 10 * 24 + 3, () => 1, countersC, day0),
    ]);
    await runtime.evaluation.evaluateHistory(house.id, addDays(today, -11), today);
    await runtime.evaluation.evaluateNow(house.id);
    expect(await openExceptions(house.id)).toEqual([]);
  });

  it('reads the engine state it kept by its schema: a part an earlier version wrote differently is dropped', async () => {
    const houseId = fixture.houseB;
    await database.db.execute(sql`
      update house_evaluations set engine = ${JSON.stringify({
        completeDay: 20261101,
        pending: ['section:1:1'],
        checkpoints: [0, 1],
        cusum: { 'section:1:1': { sum: -2, recent: [-0.05] } },
      })}::jsonb, streaks = ${JSON.stringify({ x: { short: 'two' } })}::jsonb
      where house_id = ${houseId}`);
    const { engine, streaks } = await readEvaluation(database.db, houseId);
    expect(engine.completeDay).toBeUndefined();
    expect(engine.pending).toBeUndefined();
    expect(engine.checkpoints).toEqual([0, 1]);
    expect(engine.cusum).toEqual({ 'section:1:1': { sum: -2, recent: [-0.05] } });
    expect(streaks).toEqual({});
  });
});
