/**
 * The demo's older history, invented like the rest of the demo: daily eggs per section and per collector
 * from each flock's placement until the simulator's backfill takes over, and a morning walk's dead and
 * culled hens for every day. Written as day rollups (the live readings of those days are not needed by any
 * screen), so the flock page shows a whole lay curve and the reports have months to look back on.
 */
import { schema, type Database } from '@tierscope/db';
import { addDays, productionDayStart } from '@tierscope/domain';
import { sql } from 'drizzle-orm';
import { HouseModel } from '../simulator/src/house-model';
import { layRate } from '../simulator/src/lay-model';

/** The seed `npm start` runs the demo simulator with (scripts/start.ts). */
export const DEMO_SIMULATOR_SEED = 2026;

/** A repeatable number in [0, 1) for a key (FNV-1a), so the demo is the same on every machine. */
function unit(key: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < key.length; i++) {
    h ^= key.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0) / 0x100000000;
}

export async function writeDemoHistory(db: Database, lastDay: string): Promise<number> {
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
    // The same persistent section differences as the simulator that takes over (its seed is the demo's),
    // so the history and the live days agree on each section's usual share: no step where they meet.
    const counters = await db
      .select()
      .from(schema.counters)
      .where(sql`house_id = ${house.id}`);
    const modelStart = productionDayStart('2026-01-01', house.timezone, house.lightsOn);
    const model = new HouseModel(
      {
        name: house.name,
        rows: house.rows,
        tiers: house.tiers,
        timezone: house.timezone,
        lightsOn: house.lightsOn,
        photoperiodHours: house.photoperiodHours,
        hensHoused: flock.hensHoused,
        flockAgeWeeks: 40,
        counters: counters.map((c) => {
          const section = sections.find((x) => x.id === c.sectionId);
          return {
            externalId: c.externalId,
            kind: c.kind,
            row: section?.row ?? null,
            tier: section?.tier ?? null,
          };
        }),
      },
      { seed: DEMO_SIMULATOR_SEED, start: modelStart },
    );
    // One production day from lights-on at the model's own start: only each section's share matters here.
    const dayFrom = modelStart;
    const dayTo = new Date(dayFrom.getTime() + 86_400_000);
    const weights = sections.map((s) => {
      const counter = counters.find((c) => c.sectionId === s.id);
      return counter ? model.expectedEggs(s.row, s.tier, counter.externalId, dayFrom, dayTo) : 0;
    });
    const total = weights.reduce((a, b) => a + b, 0);
    // Never a house without eggs: without the model's shares, sections share alike.
    const weightSum = total > 0 ? total : sections.length;
    if (total <= 0) weights.fill(1);
    let hens = flock.hensHoused;
    for (let day = flock.placedOn; day <= lastDay; day = addDays(day, 1)) {
      const age =
        flock.ageAtPlacementWeeks +
        (Date.parse(`${day}T00:00:00Z`) - Date.parse(`${flock.placedOn}T00:00:00Z`)) / 604_800_000;
      const dayNoise = 1 + (unit(`${house.id}:${day}`) - 0.5) * 0.03;
      const houseEggs = hens * layRate(age) * dayNoise;
      let belts = 0;
      for (const [i, s] of sections.entries()) {
        const share = (weights[i] ?? 0) / weightSum;
        const eggs = Math.round(houseEggs * share * (1 + (unit(`${s.id}:${day}`) - 0.5) * 0.02));
        belts += eggs;
        sectionRows.push({ farmId: house.farmId, sectionId: s.id, day, eggs });
      }
      collectorRows.push({
        farmId: house.farmId,
        houseId: house.id,
        day,
        eggs: Math.round(belts * 0.997),
      });
      // About 0.05 % of hens a week, more in the first weeks after moving in.
      const weekly = age - flock.ageAtPlacementWeeks < 3 ? 0.002 : 0.0005;
      const dead = Math.floor((hens * weekly) / 7 + unit(`dead:${house.id}:${day}`) * 2);
      const culled = unit(`cull:${house.id}:${day}`) < 0.15 ? 1 : 0;
      lossRows.push({ flockId: flock.id, date: day, dead, culled });
      hens -= dead + culled;
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
