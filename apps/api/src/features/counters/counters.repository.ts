import { schema, type Queryable } from '@tierscope/db';
import { and, eq, isNull, sql } from 'drizzle-orm';

const { counters, sections } = schema;

export type CounterRow = typeof counters.$inferSelect;

export interface UnknownCounterRow {
  id: number;
  externalId: string;
  createdAt: Date;
  readings: number;
  eggs: number;
  firstTs: Date | null;
  lastTs: Date | null;
}

/**
 * A farm's counters no house has (or just the one `onlyId`), with a summary of the readings held for each;
 * the latest sender first.
 */
export async function listUnknownCounters(
  db: Queryable,
  farmId: number,
  onlyId?: number,
): Promise<UnknownCounterRow[]> {
  // Each summary walks the readings key (farm, counter, ts) of one counter.
  const result = await db.execute<{
    id: number;
    external_id: string;
    created_at: string;
    readings: number;
    eggs: number;
    first_ts: string | null;
    last_ts: string | null;
  }>(sql`
    SELECT c.id, c.external_id, c.created_at, h.readings, h.eggs, h.first_ts, h.last_ts
    FROM counters c
    CROSS JOIN LATERAL (
      SELECT count(*)::int AS readings, coalesce(sum(r.eggs), 0)::int AS eggs,
             min(r.ts) AS first_ts, max(r.ts) AS last_ts
      FROM readings r WHERE r.farm_id = c.farm_id AND r.counter_id = c.id
    ) h
    WHERE c.farm_id = ${farmId} AND c.house_id IS NULL
      ${onlyId === undefined ? sql`` : sql`AND c.id = ${onlyId}`}
    ORDER BY h.last_ts DESC NULLS LAST, c.external_id`);
  return result.rows.map((r) => ({
    id: r.id,
    externalId: r.external_id,
    createdAt: new Date(r.created_at),
    readings: r.readings,
    eggs: r.eggs,
    firstTs: r.first_ts === null ? null : new Date(r.first_ts),
    lastTs: r.last_ts === null ? null : new Date(r.last_ts),
  }));
}

export async function findCounter(db: Queryable, id: number): Promise<CounterRow | undefined> {
  const [row] = await db.select().from(counters).where(eq(counters.id, id));
  return row;
}

/**
 * Locks a counter for placing or forgetting it. Ingest locks the unknown counters of its batch too
 * (`lockCounters`, ingest.repository), so a batch either lands before the placement reads the held readings,
 * or after it, when the counter has its house and the batch is rolled up as usual.
 */
export async function lockCounter(db: Queryable, id: number): Promise<CounterRow | undefined> {
  const [row] = await db.select().from(counters).where(eq(counters.id, id)).for('update');
  return row;
}

/** One belt section of a house by its row and tier. */
export async function findSection(db: Queryable, houseId: number, row: number, tier: number) {
  const [section] = await db
    .select({ id: sections.id })
    .from(sections)
    .where(and(eq(sections.houseId, houseId), eq(sections.row, row), eq(sections.tier, tier)));
  return section;
}

/** The active counters that count at a place: one belt section, or (section null) the house's collector. */
export async function countersAtPlace(
  db: Queryable,
  houseId: number,
  sectionId: number | null,
): Promise<CounterRow[]> {
  return db
    .select()
    .from(counters)
    .where(
      and(
        eq(counters.houseId, houseId),
        eq(counters.active, true),
        sectionId === null ? eq(counters.kind, 'collector') : eq(counters.sectionId, sectionId),
      ),
    );
}

/** A counter's readings in a span of time: how many there are (0 when it never counted then). */
export async function readingsBetween(
  db: Queryable,
  farmId: number,
  counterId: number,
  from: Date,
  to: Date,
): Promise<number> {
  const result = await db.execute<{ n: number }>(sql`
    SELECT count(*)::int AS n FROM readings
    WHERE farm_id = ${farmId} AND counter_id = ${counterId}
      AND ts BETWEEN ${from.toISOString()}::timestamptz AND ${to.toISOString()}::timestamptz`);
  return result.rows[0]?.n ?? 0;
}

/** True once the counter has sent any reading. */
export async function counterHasReadings(
  db: Queryable,
  farmId: number,
  counterId: number,
): Promise<boolean> {
  const result = await db.execute<{ found: boolean }>(sql`
    SELECT exists (SELECT 1 FROM readings WHERE farm_id = ${farmId} AND counter_id = ${counterId}) AS found`);
  return result.rows[0]?.found === true;
}

/** The production days (from the house's lights-on, in its zone) a counter's readings fall on. */
export async function productionDaysOf(
  db: Queryable,
  farmId: number,
  counterId: number,
  houseId: number,
): Promise<{ firstDay: string | null; lastDay: string | null }> {
  const result = await db.execute<{ first_day: string | null; last_day: string | null }>(sql`
    SELECT min(((r.ts AT TIME ZONE h.timezone) - h.lights_on::interval)::date)::text AS first_day,
           max(((r.ts AT TIME ZONE h.timezone) - h.lights_on::interval)::date)::text AS last_day
    FROM readings r JOIN houses h ON h.id = ${houseId}
    WHERE r.farm_id = ${farmId} AND r.counter_id = ${counterId}`);
  const row = result.rows[0];
  return { firstDay: row?.first_day ?? null, lastDay: row?.last_day ?? null };
}

/** Puts an unknown counter at its place (only while it is still unknown); undefined when it was not. */
export async function placeCounter(
  db: Queryable,
  id: number,
  place: { houseId: number; sectionId: number | null; kind: CounterRow['kind'] },
): Promise<CounterRow | undefined> {
  const [row] = await db
    .update(counters)
    .set({ ...place, active: true })
    .where(and(eq(counters.id, id), isNull(counters.houseId)))
    .returning();
  return row;
}

/** Retires a counter from its place; it keeps its section, so the days it counted stay its section's. */
export async function retireCounter(db: Queryable, id: number): Promise<void> {
  await db.update(counters).set({ active: false }).where(eq(counters.id, id));
}

/** Deletes a counter and its raw readings (its hour rollups go with it). */
export async function deleteCounterAndReadings(
  db: Queryable,
  farmId: number,
  id: number,
): Promise<void> {
  await db.execute(sql`DELETE FROM readings WHERE farm_id = ${farmId} AND counter_id = ${id}`);
  await db.delete(counters).where(eq(counters.id, id));
}
