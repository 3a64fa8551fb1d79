import { hash } from '@node-rs/argon2';
import { sql } from 'drizzle-orm';
import type { Database } from '../client';
import { hensAliveSql } from '../hens-alive';
import { insertHouseWithLayout } from '../house-records';
import { farms, flocks, memberships, users } from '../schema/index';

/** The invented demo company of DESIGN.md; not a real farm, company or person. */
export const DEMO_PASSWORD = 'tierscope-demo';

export const DEMO_USERS = [
  {
    email: 'admin@bramblewood.test',
    name: 'Avery Admin',
    role: 'admin',
    farms: ['North Ridge', 'Willow Creek'],
  },
  {
    email: 'manager@bramblewood.test',
    name: 'Morgan Manager',
    role: 'manager',
    farms: ['North Ridge', 'Willow Creek'],
  },
  { email: 'crew@bramblewood.test', name: 'Casey Crew', role: 'crew', farms: ['North Ridge'] },
  {
    email: 'integrator@bramblewood.test',
    name: 'Indra Integrator',
    role: 'integrator',
    farms: ['North Ridge', 'Willow Creek'],
  },
] as const;

const DEMO_FARMS = [
  {
    name: 'North Ridge',
    houses: [
      { name: 'House 1', hens: 36000 },
      { name: 'House 2', hens: 42000 },
      { name: 'House 3', hens: 30000 },
    ],
  },
  {
    name: 'Willow Creek',
    houses: [
      { name: 'House A', hens: 38000 },
      { name: 'House B', hens: 33000 },
    ],
  },
] as const;

export const DEMO_TIMEZONE = 'America/Chicago';
/** Every demo house's lights go on at this local time. */
export const DEMO_LIGHTS_ON = '04:00';

/** True when the database holds no farm yet; the demo is only ever seeded into an empty database. */
export async function isEmpty(db: Database): Promise<boolean> {
  const result = await db.execute<{ n: number }>(sql`select count(*)::int as n from farms`);
  return (result.rows[0]?.n ?? 0) === 0;
}

/** Seeds the demo farms, houses, flocks and sign-ins. `today` fixes flock dates (ISO date). */
export async function seedDemo(
  db: Database,
  today: string = new Date().toISOString().slice(0, 10),
) {
  const passwordHashes = await Promise.all(DEMO_USERS.map(() => hash(DEMO_PASSWORD)));
  await db.transaction(async (tx) => {
    const farmIds = new Map<string, number>();
    for (const [farmIndex, farm] of DEMO_FARMS.entries()) {
      const [row] = await tx.insert(farms).values({ name: farm.name }).returning();
      if (!row) throw new Error('insert into farms returned no row');
      farmIds.set(farm.name, row.id);
      for (const [houseIndex, house] of farm.houses.entries()) {
        const created = await insertHouseWithLayout(tx, row.id, {
          name: house.name,
          rows: 6,
          tiers: 3,
          timezone: DEMO_TIMEZONE,
          lightsOn: DEMO_LIGHTS_ON,
          photoperiodHours: 16,
          shortfallThresholdPct: 10,
          // An invented price, so eggs lost to exceptions carry a money figure in the demo.
          eggPricePerDozen: 2.4,
        });
        // Flocks of different ages, so the farm shows young, peak and older lay.
        const ageWeeks = 18;
        const weeksInHouse = 8 + 11 * ((farmIndex * 3 + houseIndex) % 4);
        await tx.insert(flocks).values({
          houseId: created.id,
          placedOn: shiftDays(today, -7 * weeksInHouse),
          hensHoused: house.hens,
          ageAtPlacementWeeks: ageWeeks,
          breed: houseIndex % 2 === 0 ? 'brown hybrid' : 'white hybrid',
        });
      }
    }
    for (const [index, user] of DEMO_USERS.entries()) {
      const [created] = await tx
        .insert(users)
        .values({ email: user.email, name: user.name, passwordHash: passwordHashes[index] ?? '' })
        .returning();
      if (!created) throw new Error('insert into users returned no row');
      await tx.insert(memberships).values(
        user.farms.map((farmName) => ({
          userId: created.id,
          farmId: farmIds.get(farmName) ?? 0,
          role: user.role,
        })),
      );
    }
  });
}

function shiftDays(isoDate: string, days: number): string {
  const date = new Date(`${isoDate}T00:00:00Z`);
  date.setUTCDate(date.getUTCDate() + days);
  return date.toISOString().slice(0, 10);
}

/** Hens alive (housed less the morning walks' dead and culled) and flock age per house, for the simulator. */
export async function demoFlocks(db: Database, today = new Date()) {
  const rows = await db.select().from(flocks);
  const alive = await db.execute<{ id: number; hens: number }>(
    sql`select id, ${hensAliveSql(sql`id`, sql`hens_housed`, sql`${today.toISOString().slice(0, 10)}::date`)} as hens from flocks`,
  );
  const hensBy = new Map(alive.rows.map((r) => [r.id, r.hens]));
  return new Map(
    rows
      .filter((f) => f.endedOn === null)
      .map((f) => {
        const weeksInHouse =
          (today.getTime() - new Date(`${f.placedOn}T00:00:00Z`).getTime()) / (7 * 86_400_000);
        return [
          f.houseId,
          {
            hensHoused: Math.max(1, hensBy.get(f.id) ?? f.hensHoused),
            flockAgeWeeks: f.ageAtPlacementWeeks + weeksInHouse,
          },
        ];
      }),
  );
}

/** True once any reading is stored: the demo's history is only backfilled into an empty database. */
export async function hasReadings(db: Database): Promise<boolean> {
  const result = await db.execute<{ found: boolean }>(
    sql`select exists (select 1 from readings) as found`,
  );
  return result.rows[0]?.found === true;
}
