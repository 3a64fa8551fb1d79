/**
 * The demo's older history, invented like the rest of the demo: daily eggs per section and per collector
 * from each flock's placement until the simulator's backfill takes over, and a morning walk's dead and
 * culled hens for every day. Written as day rollups (the live readings of those days are not needed by any
 * screen), so the flock page shows a whole lay curve and the reports have months to look back on.
 */
import type { SimulatorHouse } from '@tierscope/contracts';
import { schema, type Database } from '@tierscope/db';
import { addDays } from '@tierscope/domain';
import { sql } from 'drizzle-orm';
import { RealisticHouseModel } from '../simulator/src/realistic-model';

/** The seed `npm start` runs the demo simulator with (scripts/start.ts). */
export const DEMO_SIMULATOR_SEED = 2026;

/**
 * The demo's planted faults (DESIGN.md), as simulator specs relative to its start: a feed-line fault in one
 * row, a dead counter, a slow water problem on one tier (about 1.9 % a day). `npm start` plants them and the
 * demo-scenario integration test checks that they, and nothing else, are found.
 */
export const DEMO_FAULTS = [
  'feed:house=House 2,row=4,drop=0.15,from=-2d',
  'silent:house=House 3,row=2,tier=1,from=-30h',
  'water:house=House A,tier=3,decline=0.0008/h,from=-7d',
] as const;

/** A repeatable number in [0, 1) for a key (FNV-1a), so the demo is the same on every machine. */
function unit(key: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < key.length; i++) {
    h ^= key.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0) / 0x100000000;
}

/** A house as the simulator takes it (its farm file's shape), from its database rows. */
export function simulatorHouseOf(
  house: typeof schema.houses.$inferSelect,
  sections: readonly (typeof schema.sections.$inferSelect)[],
  counters: readonly (typeof schema.counters.$inferSelect)[],
  flock: { hensHoused: number; flockAgeWeeks: number },
): SimulatorHouse {
  return {
    name: house.name,
    rows: house.rows,
    tiers: house.tiers,
    timezone: house.timezone,
    lightsOn: house.lightsOn,
    photoperiodHours: house.photoperiodHours,
    ...flock,
    counters: counters
      .filter((c) => c.houseId === house.id)
      .map((c) => {
        const section = sections.find((x) => x.id === c.sectionId);
        return {
          externalId: c.externalId,
          kind: c.kind,
          row: section?.row ?? null,
          tier: section?.tier ?? null,
        };
      }),
  };
}

/** A flock's age in weeks on a day. */
function ageOn(flock: { placedOn: string; ageAtPlacementWeeks: number }, day: string): number {
  return (
    flock.ageAtPlacementWeeks +
    (Date.parse(`${day}T00:00:00Z`) - Date.parse(`${flock.placedOn}T00:00:00Z`)) / 604_800_000
  );
}

/**
 * Writes the daily totals of every flock from its placement up to `lastDay`, drawn from the simulator that
 * starts at `simulatorStart` (the same production days, so the same day-to-day noise), and its morning walks up
 * to `walksUntil` (the crew keeps walking the house while the simulator backfills the later days' counts).
 */
export async function writeDemoHistory(
  db: Database,
  lastDay: string,
  simulatorStart = new Date(),
  walksUntil = lastDay,
): Promise<number> {
  const flocks = await db.select().from(schema.flocks);
  let days = 0;
  for (const flock of flocks) {
    const [house] = await db
      .select()
      .from(schema.houses)
      .where(sql`id = ${flock.houseId}`);
    if (!house) continue;
    const sections = await db
      .select()
      .from(schema.sections)
      .where(sql`house_id = ${house.id}`)
      .orderBy(schema.sections.row, schema.sections.tier);
    const sectionRows: (typeof schema.sectionDayRollups.$inferInsert)[] = [];
    const collectorRows: (typeof schema.collectorDayRollups.$inferInsert)[] = [];
    const lossRows: (typeof schema.mortality.$inferInsert)[] = [];
    // The morning walks first: the hens alive on each day decide how many eggs the model draws.
    const hensOn = new Map<string, number>();
    let hens = flock.hensHoused;
    const lastWalk = walksUntil > lastDay ? walksUntil : lastDay;
    for (let day = flock.placedOn; day <= lastWalk; day = addDays(day, 1)) {
      const age = ageOn(flock, day);
      hensOn.set(day, hens);
      // About 0.05 % of hens a week, more in the first weeks after moving in.
      const weekly = age - flock.ageAtPlacementWeeks < 3 ? 0.002 : 0.0005;
      const dead = Math.floor((hens * weekly) / 7 + unit(`dead:${house.id}:${day}`) * 2);
      const culled = unit(`cull:${house.id}:${day}`) < 0.15 ? 1 : 0;
      lossRows.push({ flockId: flock.id, date: day, dead, culled });
      hens -= dead + culled;
    }
    // The realistic simulator that takes over, with the same seed: the same persistent section differences,
    // day-to-day noise and lay curve, so the history and the live days agree on each section's usual share
    // and wobble (no step where they meet).
    const counters = await db
      .select()
      .from(schema.counters)
      .where(sql`house_id = ${house.id}`);
    const now = simulatorStart;
    const model = new RealisticHouseModel(
      simulatorHouseOf(house, sections, counters, {
        hensHoused: flock.hensHoused,
        flockAgeWeeks: ageOn(flock, now.toISOString().slice(0, 10)),
      }),
      {
        seed: DEMO_SIMULATOR_SEED,
        start: now,
        hensOn: (day) => (hensOn.get(day) ?? flock.hensHoused) / Math.max(1, sections.length),
      },
    );
    for (let day = flock.placedOn; day <= lastDay; day = addDays(day, 1)) {
      const drawn = model.day(day);
      let belts = 0;
      for (const s of sections) {
        const section = drawn.sections.find((x) => x.row === s.row && x.tier === s.tier);
        const eggs = section ? section.counted.reduce((a, b) => a + b, 0) : 0;
        belts += eggs;
        sectionRows.push({ farmId: house.farmId, sectionId: s.id, day, eggs });
      }
      const collected = drawn.collector.reduce((a, b) => a + b, 0);
      collectorRows.push({
        farmId: house.farmId,
        houseId: house.id,
        day,
        eggs: collected > 0 ? collected : belts,
      });
      days += 1;
    }
    for (let i = 0; i < sectionRows.length; i += 5000) {
      await db
        .insert(schema.sectionDayRollups)
        .values(sectionRows.slice(i, i + 5000))
        .onConflictDoNothing();
    }
    if (collectorRows.length > 0)
      await db.insert(schema.collectorDayRollups).values(collectorRows).onConflictDoNothing();
    if (lossRows.length > 0)
      await db.insert(schema.mortality).values(lossRows).onConflictDoNothing();
  }
  return days;
}
