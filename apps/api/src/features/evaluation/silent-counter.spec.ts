import { createTestDatabase } from '@tierscope/db/testing';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Runtime } from '../../app';
import { seedFixture, type Fixture } from '../../testing/fixtures';
import { bearerFor, gatewayKeyFor, postReadings } from '../../testing/sign-in';
import { createTestApp, createTestRuntime } from '../../testing/test-app';
import { countersOfHouse } from '../houses/houses.repository';

/**
 * The silent-counter check on the real database, in the first hours of light (issue 11). House A1: 4 rows ×
 * 3 tiers, America/Chicago, lights on at 04:00 (10:00 UTC in November), readings every 15 minutes.
 *
 * Hens lay on a morning curve (nothing in the first hour, then rising); row 2 tier 2 (under a dim light) always lays two hours
 * behind its peers, and row 3 tier 1's counter died during the night before the last day. The engine learns
 * each section's usual count by each hour of the morning from the hourly rollups, so the late section is
 * never silent while the dead one is found as its peers' eggs become many — not after a blanket grace.
 */
let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let runtime: Runtime;
let app: ReturnType<typeof createTestApp>;

const DAY0 = Date.UTC(2026, 10, 2, 10);
const HOUR = 3_600_000;
const SLOT = 15 * 60_000;
const DAYS = 8;

/** Share of a day's eggs laid by `hours` after lights-on: a gamma(3) curve starting one hour in. */
function laidBy(hours: number): number {
  const x = Math.max(0, hours - 1) / 1.5;
  return 1 - Math.exp(-x) * (1 + x + (x * x) / 2);
}

/** A small deterministic day-to-day wobble of ± 3 % (a sine hash), so no two days are the same. */
function wobble(seed: number): number {
  return 1 + 0.03 * Math.sin(seed * 12.9898) * Math.cos(seed * 78.233);
}

function readingsOf(
  counters: Awaited<ReturnType<typeof countersOfHouse>>,
  day: number,
  untilHours: number,
): { counter: string; ts: string; eggs: number }[] {
  const readings: { counter: string; ts: string; eggs: number }[] = [];
  const belts = counters.filter((c) => c.kind === 'belt');
  for (let slot = 0; slot < untilHours * 4; slot++) {
    const ts = new Date(DAY0 + day * 24 * HOUR + (slot + 1) * SLOT).toISOString();
    let laid = 0;
    for (const c of belts) {
      const lag = c.row === 2 && c.tier === 2 ? 2 : 0;
      const day800 = 800 * wobble(day * 100 + (c.row ?? 0) * 10 + (c.tier ?? 0));
      const at = (s: number) => laidBy((s * SLOT) / HOUR - lag);
      const eggs = Math.round(day800 * (at(slot + 1) - at(slot)));
      laid += eggs;
      const isDead = c.row === 3 && c.tier === 1 && day === DAYS - 1;
      readings.push({ counter: c.externalId, ts, eggs: isDead ? 0 : eggs });
    }
    readings.push({
      counter: counters.find((c) => c.kind === 'collector')?.externalId ?? '',
      ts,
      eggs: laid,
    });
  }
  return readings;
}

async function openSilent(): Promise<string[]> {
  const rows = await database.db.execute<{ row: number; tier: number }>(
    sql`select row, tier from exceptions where house_id = ${fixture.houseA}
        and kind = 'silent_counter' and status <> 'closed' order by row, tier`,
  );
  return rows.rows.map((r) => `${r.row}:${r.tier}`);
}

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  runtime = createTestRuntime(database.db);
  app = createTestApp(database.db, { runtime });
  const key = await gatewayKeyFor(
    app,
    await bearerFor(app, fixture.usersA.admin.email),
    fixture.farmA,
  );
  const counters = await countersOfHouse(database.db, fixture.houseA);
  const readings = [];
  for (let day = 0; day < DAYS - 1; day++) readings.push(...readingsOf(counters, day, 16));
  readings.push(...readingsOf(counters, DAYS - 1, 3));
  await postReadings(app, key, readings);
});
afterAll(async () => {
  await database.drop();
});

describe('silent counters in the first hours of light', () => {
  it('finds the counter dead since the night as its peers’ eggs become many, never the late section', async () => {
    const lightsOn = DAY0 + (DAYS - 1) * 24 * HOUR;
    const found: { hours: number; silent: string[] }[] = [];
    for (let minutes = 30; minutes <= 180; minutes += 15) {
      await runtime.evaluation.evaluateNow(fixture.houseA, new Date(lightsOn + minutes * 60_000));
      found.push({ hours: minutes / 60, silent: await openSilent() });
    }
    // Nothing while every section is still on its first eggs (under 5 % of a day: about 2.25 h in).
    for (const f of found.filter((x) => laidBy(x.hours) < 0.05)) expect(f.silent).toEqual([]);
    // Then the dead counter, within 45 minutes of its peers' 5 %, and the late section never.
    const first = found.find((f) => f.silent.length > 0);
    expect(first?.silent).toEqual(['3:1']);
    expect(first?.hours).toBeLessThanOrEqual(2.25 + 0.75);
    expect(found.at(-1)?.silent).toEqual(['3:1']);
  });
});
