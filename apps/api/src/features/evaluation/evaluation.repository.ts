import { hensAliveSql, schema, type Queryable } from '@tierscope/db';
import { and, asc, eq, sql } from 'drizzle-orm';

const { houses, sections, counters, flocks } = schema;

export type HouseRow = typeof houses.$inferSelect;

export async function houseLayout(db: Queryable, houseId: number) {
  const [house] = await db.select().from(houses).where(eq(houses.id, houseId));
  if (!house) return undefined;
  const sectionRows = await db
    .select({ id: sections.id, row: sections.row, tier: sections.tier, birds: sections.birdCount })
    .from(sections)
    .where(eq(sections.houseId, houseId));
  const counterRows = await db
    .select({ id: counters.id, kind: counters.kind, sectionId: counters.sectionId })
    .from(counters)
    .where(and(eq(counters.houseId, houseId), eq(counters.active, true)));
  return { house, sections: sectionRows, counters: counterRows };
}

export async function allHouseIds(db: Queryable): Promise<number[]> {
  const rows = await db.select({ id: houses.id }).from(houses).orderBy(asc(houses.id));
  return rows.map((r) => r.id);
}

/** Eggs per section per production day from the daily rollups. */
export async function sectionDays(
  db: Queryable,
  farmId: number,
  sectionIds: number[],
  firstDay: string,
  lastDay: string,
) {
  if (sectionIds.length === 0) return [];
  const result = await db.execute<{ section_id: number; day: string; eggs: number }>(sql`
    SELECT section_id, day::text AS day, eggs FROM section_day_rollups
    WHERE farm_id = ${farmId} AND section_id = ANY(${sql.param(sectionIds)}::int[])
      AND day BETWEEN ${firstDay}::date AND ${lastDay}::date`);
  return result.rows;
}

/** Eggs per section summed over a range of days (a window). */
export async function sectionTotals(
  db: Queryable,
  farmId: number,
  sectionIds: number[],
  firstDay: string,
  lastDay: string,
) {
  if (sectionIds.length === 0) return new Map<number, number>();
  const result = await db.execute<{ section_id: number; eggs: number }>(sql`
    SELECT section_id, sum(eggs)::int AS eggs FROM section_day_rollups
    WHERE farm_id = ${farmId} AND section_id = ANY(${sql.param(sectionIds)}::int[])
      AND day BETWEEN ${firstDay}::date AND ${lastDay}::date
    GROUP BY section_id`);
  return new Map(result.rows.map((r) => [r.section_id, r.eggs]));
}

/** Eggs per section from the hourly rollups between two instants (past checkpoints inside a day). */
export async function sectionEggsBetween(
  db: Queryable,
  farmId: number,
  houseId: number,
  from: Date,
  to: Date,
) {
  const result = await db.execute<{ section_id: number; eggs: number }>(sql`
    SELECT c.section_id, sum(r.eggs)::int AS eggs
    FROM counter_hour_rollups r JOIN counters c ON c.id = r.counter_id
    WHERE r.farm_id = ${farmId} AND c.house_id = ${houseId} AND c.kind = 'belt' AND c.section_id IS NOT NULL
      AND r.hour >= ${from.toISOString()}::timestamptz AND r.hour < ${to.toISOString()}::timestamptz
    GROUP BY c.section_id`);
  return new Map(result.rows.map((r) => [r.section_id, r.eggs]));
}

/**
 * Each belt counter's data horizon: the time of its newest reading after `since` (absent: nothing since).
 * A counter whose gateway is late has an old horizon; a dead counter still sends its zeros.
 */
export async function beltHorizons(db: Queryable, farmId: number, houseId: number, since: Date) {
  // One backward step down the readings key per counter (farm, counter, ts), not a scan of the day's rows:
  // the map asks for this on every live frame.
  const result = await db.execute<{ section_id: number; last_ts: string | null }>(sql`
    SELECT c.section_id,
           (SELECT max(r.ts) FROM readings r
             WHERE r.farm_id = ${farmId} AND r.counter_id = c.id
               AND r.ts > ${since.toISOString()}::timestamptz) AS last_ts
    FROM counters c
    WHERE c.house_id = ${houseId} AND c.kind = 'belt' AND c.section_id IS NOT NULL`);
  const horizons = new Map<number, Date>();
  for (const r of result.rows) {
    if (r.last_ts === null) continue;
    const at = new Date(r.last_ts);
    const known = horizons.get(r.section_id);
    if (!known || at > known) horizons.set(r.section_id, at);
  }
  return horizons;
}

/** When a section's belt last counted an egg, looking back to `since` (null when it has not since then). */
export async function lastCountedAt(
  db: Queryable,
  farmId: number,
  houseId: number,
  row: number,
  tier: number,
  since: Date,
): Promise<Date | null> {
  // One backward walk down the readings key (farm, counter, ts) per belt counter of the section.
  const result = await db.execute<{ last_ts: string | null }>(sql`
    SELECT max((SELECT max(r.ts) FROM readings r
                 WHERE r.farm_id = ${farmId} AND r.counter_id = c.id AND r.eggs > 0
                   AND r.ts > ${since.toISOString()}::timestamptz)) AS last_ts
    FROM counters c JOIN sections s ON s.id = c.section_id
    WHERE c.house_id = ${houseId} AND c.kind = 'belt' AND s.row = ${row} AND s.tier = ${tier}`);
  const last = result.rows[0]?.last_ts ?? null;
  return last === null ? null : new Date(last);
}

/**
 * For the silent-counter check: when each of `counterIds` last counted an egg at or before `until` (looking
 * back to `since`; null when not since then), and every belt counter's eggs by minute from the earliest of
 * those — but not before `notBefore` — or `alsoFrom`, to `until` (raw readings), so the caller can sum any
 * peer's eggs after any of them.
 */
export async function quietCounters(
  db: Queryable,
  farmId: number,
  counterIds: number[],
  beltIds: number[],
  since: Date,
  until: Date,
  alsoFrom: Date,
  notBefore: Date,
) {
  const last = new Map<number, Date | null>();
  if (counterIds.length === 0) return { last, byMinute: [] };
  // One backward walk down the readings key (farm, counter, ts) per quiet counter.
  const lasts = await db.execute<{ id: number; last_ts: string | null }>(sql`
    SELECT c.id, (SELECT max(r.ts) FROM readings r
                  WHERE r.farm_id = ${farmId} AND r.counter_id = c.id AND r.eggs > 0
                    AND r.ts > ${since.toISOString()}::timestamptz
                    AND r.ts <= ${until.toISOString()}::timestamptz) AS last_ts
    FROM unnest(${sql.param(counterIds)}::int[]) AS c(id)`);
  for (const row of lasts.rows)
    last.set(row.id, row.last_ts === null ? null : new Date(row.last_ts));
  const from = new Date(
    Math.min(
      ...[...last.values()].map((d) => Math.max((d ?? since).getTime(), notBefore.getTime())),
      alsoFrom.getTime(),
    ),
  );
  const minutes = await db.execute<{ counter_id: number; minute: string; eggs: number }>(sql`
    SELECT counter_id, date_trunc('minute', ts) AS minute, sum(eggs)::int AS eggs FROM readings
    WHERE farm_id = ${farmId} AND counter_id = ANY(${sql.param(beltIds)}::int[]) AND eggs > 0
      AND ts > ${from.toISOString()}::timestamptz AND ts <= ${until.toISOString()}::timestamptz
    GROUP BY 1, 2`);
  return {
    last,
    byMinute: minutes.rows.map((r) => ({
      counterId: r.counter_id,
      minute: new Date(r.minute),
      eggs: r.eggs,
    })),
  };
}

export async function collectorTotal(
  db: Queryable,
  farmId: number,
  houseId: number,
  firstDay: string,
  lastDay: string,
) {
  const result = await db.execute<{ eggs: number | null }>(sql`
    SELECT sum(eggs)::int AS eggs FROM collector_day_rollups
    WHERE farm_id = ${farmId} AND house_id = ${houseId} AND day BETWEEN ${firstDay}::date AND ${lastDay}::date`);
  return result.rows[0]?.eggs ?? 0;
}

/** Eggs each counter sent since `since` (raw readings), and whether it sent anything at all. */
export async function counterEggsSince(
  db: Queryable,
  farmId: number,
  counterIds: number[],
  since: Date,
) {
  if (counterIds.length === 0) return new Map<number, number>();
  const result = await db.execute<{ counter_id: number; eggs: number }>(sql`
    SELECT counter_id, sum(eggs)::int AS eggs FROM readings
    WHERE farm_id = ${farmId} AND counter_id = ANY(${sql.param(counterIds)}::int[]) AND ts > ${since.toISOString()}::timestamptz
    GROUP BY counter_id`);
  return new Map(result.rows.map((r) => [r.counter_id, r.eggs]));
}

/** Hens alive on each day of a range for the house's current flock (housed minus dead and culled before that day). */
export async function hensAlive(db: Queryable, houseId: number, firstDay: string, lastDay: string) {
  const result = await db.execute<{ day: string; hens: number }>(sql`
    SELECT d::date::text AS day, ${hensAliveSql(sql`f.id`, sql`f.hens_housed`, sql`d::date`)} AS hens
    FROM generate_series(${firstDay}::date, ${lastDay}::date, interval '1 day') d
    JOIN ${flocks} f ON f.house_id = ${houseId} AND f.placed_on <= d::date AND (f.ended_on IS NULL OR f.ended_on >= d::date)`);
  return new Map(result.rows.map((r) => [r.day, r.hens]));
}

/** Eggs per belt section per hour between two instants. */
export async function sectionHours(
  db: Queryable,
  farmId: number,
  houseId: number,
  from: Date,
  to: Date,
) {
  const result = await db.execute<{ section_id: number; hour: Date; eggs: number }>(sql`
    SELECT c.section_id, r.hour, sum(r.eggs)::int AS eggs
    FROM counter_hour_rollups r JOIN counters c ON c.id = r.counter_id
    WHERE r.farm_id = ${farmId} AND c.house_id = ${houseId} AND c.kind = 'belt' AND c.section_id IS NOT NULL
      AND r.hour >= ${from.toISOString()}::timestamptz AND r.hour < ${to.toISOString()}::timestamptz
    GROUP BY c.section_id, r.hour ORDER BY r.hour`);
  return result.rows.map((r) => ({
    sectionId: r.section_id,
    hour: new Date(r.hour),
    eggs: r.eggs,
  }));
}

/** Eggs each counter counted in the hourly rollups over [from, to) — the look-back of past checkpoints. */
export async function counterEggsInHours(
  db: Queryable,
  farmId: number,
  counterIds: number[],
  from: Date,
  to: Date,
) {
  if (counterIds.length === 0) return new Map<number, number>();
  const result = await db.execute<{ counter_id: number; eggs: number }>(sql`
    SELECT counter_id, sum(eggs)::int AS eggs FROM counter_hour_rollups
    WHERE farm_id = ${farmId} AND counter_id = ANY(${sql.param(counterIds)}::int[])
      AND hour >= ${from.toISOString()}::timestamptz AND hour < ${to.toISOString()}::timestamptz
    GROUP BY counter_id`);
  return new Map(result.rows.map((r) => [r.counter_id, r.eggs]));
}

/**
 * Each section's eggs by each checkpoint (hours after lights-on, from the hourly rollups) and over the whole
 * day (the daily rollups), for the production days firstDay…lastDay. Hours count from lights-on on the
 * house's own clock.
 */
export async function sectionStageCounts(
  db: Queryable,
  house: Pick<HouseRow, 'id' | 'farmId' | 'timezone' | 'lightsOn'>,
  checkpointHours: readonly number[],
  firstDay: string,
  lastDay: string,
): Promise<{ sectionId: number; day: string; byStage: number[] }[]> {
  const local = sql`((r.hour AT TIME ZONE ${house.timezone}) - ${house.lightsOn}::interval)`;
  const columns = checkpointHours.map(
    (h, i) =>
      sql`coalesce(sum(r.eggs) FILTER (WHERE ${local} - (${local})::date::timestamp < ${`${h} hours`}::interval), 0)::int AS ${sql.raw(`s${i}`)}`,
  );
  const partial = await db.execute<
    Record<string, number> & { section_id: number; day: string }
  >(sql`
    SELECT c.section_id, (${local})::date::text AS day, ${sql.join(columns, sql`, `)}
    FROM counter_hour_rollups r JOIN counters c ON c.id = r.counter_id
    WHERE r.farm_id = ${house.farmId} AND c.house_id = ${house.id} AND c.kind = 'belt'
      AND c.section_id IS NOT NULL
      AND (${local})::date BETWEEN ${firstDay}::date AND ${lastDay}::date
      AND r.hour >= (${firstDay}::date - 1)::timestamp AT TIME ZONE ${house.timezone}
      AND r.hour < (${lastDay}::date + 2)::timestamp AT TIME ZONE ${house.timezone}
    GROUP BY 1, 2`);
  const whole = await db.execute<{ section_id: number; day: string; eggs: number }>(sql`
    SELECT d.section_id, d.day::text AS day, d.eggs FROM section_day_rollups d
    JOIN sections s ON s.id = d.section_id
    WHERE d.farm_id = ${house.farmId} AND s.house_id = ${house.id}
      AND d.day BETWEEN ${firstDay}::date AND ${lastDay}::date`);
  const byKey = new Map<string, { sectionId: number; day: string; byStage: number[] }>();
  for (const row of whole.rows) {
    byKey.set(`${row.section_id}|${row.day}`, {
      sectionId: row.section_id,
      day: row.day,
      // Days loaded from daily totals only (no hourly rollups) say nothing about the checkpoints.
      byStage: [...checkpointHours.map(() => Number.NaN), row.eggs],
    });
  }
  for (const row of partial.rows) {
    const entry = byKey.get(`${row.section_id}|${row.day}`);
    if (!entry) continue;
    checkpointHours.forEach((_, i) => {
      entry.byStage[i] = row[`s${i}`] ?? 0;
    });
  }
  return [...byKey.values()];
}
