import { hensAliveSql, schema, type Queryable } from '@tierscope/db';
import { eq, sql } from 'drizzle-orm';

const { houses, farms } = schema;

export async function houseWithFarm(db: Queryable, houseId: number) {
  const [row] = await db
    .select({ house: houses, farmName: farms.name })
    .from(houses)
    .innerJoin(farms, eq(farms.id, houses.farmId))
    .where(eq(houses.id, houseId));
  return row;
}

export async function farmWithHouses(db: Queryable, farmId: number) {
  const [farm] = await db.select().from(farms).where(eq(farms.id, farmId));
  if (!farm) return undefined;
  const list = await db.select().from(houses).where(eq(houses.farmId, farmId)).orderBy(houses.name);
  return { farm, houses: list };
}

/** Eggs of each house of a farm per production day: belts summed, collector, and hens alive. */
export async function farmDays(db: Queryable, farmId: number, from: string, to: string) {
  const result = await db.execute<{
    house_id: number;
    day: string;
    belts: number;
    collector: number;
    hens: number | null;
  }>(sql`
    WITH days AS (SELECT d::date AS day FROM generate_series(${from}::date, ${to}::date, interval '1 day') d),
    belts AS (
      SELECT s.house_id, r.day, sum(r.eggs)::int AS eggs
      FROM section_day_rollups r JOIN sections s ON s.id = r.section_id
      WHERE r.farm_id = ${farmId} AND r.day BETWEEN ${from}::date AND ${to}::date
      GROUP BY s.house_id, r.day),
    collector AS (
      SELECT house_id, day, eggs FROM collector_day_rollups
      WHERE farm_id = ${farmId} AND day BETWEEN ${from}::date AND ${to}::date)
    SELECT h.id AS house_id, d.day::text AS day,
           coalesce(b.eggs, 0)::int AS belts, coalesce(c.eggs, 0)::int AS collector,
           (SELECT ${hensAliveSql(sql`f.id`, sql`f.hens_housed`, sql`d.day`)}
              FROM flocks f WHERE f.house_id = h.id AND f.placed_on <= d.day
               AND (f.ended_on IS NULL OR f.ended_on >= d.day)
              ORDER BY f.placed_on DESC LIMIT 1) AS hens
    FROM houses h CROSS JOIN days d
    LEFT JOIN belts b ON b.house_id = h.id AND b.day = d.day
    LEFT JOIN collector c ON c.house_id = h.id AND c.day = d.day
    WHERE h.farm_id = ${farmId}
    ORDER BY h.id, d.day`);
  return result.rows;
}

/** Per house: exceptions opened in the range, and eggs lost on its days (each exception's day figures). */
export async function farmLosses(db: Queryable, farmId: number, from: string, to: string) {
  const result = await db.execute<{ house_id: number; opened: number; lost: number }>(sql`
    SELECT e.house_id,
           count(*) FILTER (WHERE e.opened_day BETWEEN ${from}::date AND ${to}::date)::int AS opened,
           coalesce(sum((SELECT sum(value::text::numeric) FROM jsonb_each(e.lost_by_day)
                         WHERE key::date BETWEEN ${from}::date AND ${to}::date)), 0)::int AS lost
    FROM exceptions e
    WHERE e.farm_id = ${farmId}
      AND e.opened_day <= ${to}::date
      AND coalesce(e.closed_at, now()) >= ${from}::date
    GROUP BY e.house_id`);
  return new Map(result.rows.map((r) => [r.house_id, r]));
}
