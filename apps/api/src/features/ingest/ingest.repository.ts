import type { CounterKind } from '@tierscope/domain';
import { schema, type Queryable } from '@tierscope/db';
import { and, eq, inArray, sql, type SQL } from 'drizzle-orm';
import { rollupCtes } from './rollup-ctes';

const { counters } = schema;

export interface ResolvedCounter {
  id: number;
  externalId: string;
  houseId: number | null;
  sectionId: number | null;
  kind: CounterKind;
}

/** The farm's counters by external id; ids never seen before are kept as unmapped counters. */
export async function resolveCounters(
  db: Queryable,
  farmId: number,
  externalIds: string[],
): Promise<Map<string, ResolvedCounter>> {
  if (externalIds.length === 0) return new Map();
  const select = () =>
    db
      .select({
        id: counters.id,
        externalId: counters.externalId,
        houseId: counters.houseId,
        sectionId: counters.sectionId,
        kind: counters.kind,
      })
      .from(counters)
      .where(and(eq(counters.farmId, farmId), inArray(counters.externalId, externalIds)));
  let found = await select();
  if (found.length < externalIds.length) {
    const known = new Set(found.map((c) => c.externalId));
    const unknown = externalIds.filter((id) => !known.has(id));
    await db
      .insert(counters)
      .values(unknown.map((externalId) => ({ farmId, externalId, kind: 'belt' as const })))
      .onConflictDoNothing();
    found = await select();
  }
  return new Map(found.map((c) => [c.externalId, c]));
}

/** Makes sure the monthly partitions for these months exist (see migration 0002). */
export async function ensureReadingPartitions(db: Queryable, months: string[]): Promise<void> {
  for (const month of months) {
    await db.execute(sql`select ensure_readings_partition(${month}::date)`);
  }
}

/** The rollup CTEs for a farm id that is known to be an integer (it comes from the gateway's row). */
function rollUp(farmId: number, source: string): SQL {
  if (!Number.isInteger(farmId)) throw new TypeError('farmId must be an integer');
  return sql.raw(rollupCtes(String(farmId), source));
}

export interface ReadingRows {
  counterIds: number[];
  /** ISO-8601 instants: cheaper to send than Date objects, which pg formats one by one. */
  ts: string[];
  eggs: number[];
  totals: (number | null)[];
}

/**
 * Inserts the readings that are new and rolls up only those, in one statement: a re-sent reading collides
 * on the primary key, is skipped, and so is never counted twice.
 */
export async function insertReadings(
  db: Queryable,
  farmId: number,
  rows: ReadingRows,
): Promise<{
  added: number;
  perHouse: { houseId: number; added: number; eggs: number; firstTs: Date; lastTs: Date }[];
}> {
  if (rows.counterIds.length === 0) return { added: 0, perHouse: [] };
  const result = await db.execute<{
    house_id: number | null;
    added: number;
    eggs: number;
    first_ts: Date;
    last_ts: Date;
  }>(sql`
    WITH input AS (
      SELECT * FROM unnest(${sql.param(rows.counterIds)}::int[], ${sql.param(rows.ts)}::timestamptz[],
                           ${sql.param(rows.eggs)}::int[], ${sql.param(rows.totals)}::int[])
        AS t(counter_id, ts, eggs, total)
      ORDER BY counter_id, ts
    ),
    added AS (
      INSERT INTO readings (farm_id, counter_id, ts, eggs, total)
      SELECT ${farmId}, counter_id, ts, eggs, total FROM input
      ON CONFLICT DO NOTHING
      RETURNING counter_id, ts, eggs
    ),
    ${rollUp(farmId, 'added')}
    SELECT c.house_id, count(*)::int AS added, coalesce(sum(a.eggs), 0)::int AS eggs,
           min(a.ts) AS first_ts, max(a.ts) AS last_ts
    FROM added a JOIN counters c ON c.id = a.counter_id
    GROUP BY c.house_id`);
  let added = 0;
  const perHouse = [];
  for (const row of result.rows) {
    added += row.added;
    if (row.house_id !== null) {
      perHouse.push({
        houseId: row.house_id,
        added: row.added,
        eggs: row.eggs,
        firstTs: new Date(row.first_ts),
        lastTs: new Date(row.last_ts),
      });
    }
  }
  return { added, perHouse };
}

/** Corrects stored interval counts by `delta` (for totals that arrived out of order) and their rollups. */
export async function adjustReadings(
  db: Queryable,
  farmId: number,
  rows: { counterIds: number[]; ts: Date[]; deltas: number[] },
): Promise<void> {
  if (rows.counterIds.length === 0) return;
  await db.execute(sql`
    WITH input AS (
      SELECT * FROM unnest(${sql.param(rows.counterIds)}::int[], ${sql.param(rows.ts)}::timestamptz[],
                           ${sql.param(rows.deltas)}::int[]) AS t(counter_id, ts, eggs)
    ),
    changed AS (
      UPDATE readings r SET eggs = r.eggs + i.eggs
      FROM input i
      WHERE r.farm_id = ${farmId} AND r.counter_id = i.counter_id AND r.ts = i.ts
      RETURNING r.counter_id, r.ts, i.eggs
    ),
    ${rollUp(farmId, 'changed')}
    SELECT count(*) FROM changed`);
}

/**
 * Locks counters until the transaction ends, in id order so concurrent batches cannot deadlock on them: for
 * running-total work, and for unknown counters that may be placed meanwhile (counters.service).
 */
export async function lockCounters(db: Queryable, ids: number[]): Promise<void> {
  if (ids.length === 0) return;
  await db.execute(
    sql`SELECT id FROM counters WHERE id = ANY(${sql.param(ids)}::int[]) ORDER BY id FOR UPDATE`,
  );
}

/** A counter's stored readings from the last three before `from` (so a glitch just before keeps its baseline) to the first one after `to`. */
export async function readingsAround(
  db: Queryable,
  farmId: number,
  counterId: number,
  from: Date,
  to: Date,
) {
  const result = await db.execute<{ ts: Date; eggs: number; total: number | null }>(sql`
    (SELECT ts, eggs, total FROM readings WHERE farm_id = ${farmId} AND counter_id = ${counterId} AND ts < ${from}
       ORDER BY ts DESC LIMIT 3)
    UNION ALL
    (SELECT ts, eggs, total FROM readings WHERE farm_id = ${farmId} AND counter_id = ${counterId}
       AND ts >= ${from} AND ts <= ${to})
    UNION ALL
    (SELECT ts, eggs, total FROM readings WHERE farm_id = ${farmId} AND counter_id = ${counterId} AND ts > ${to}
       ORDER BY ts LIMIT 1)`);
  return result.rows
    .map((r) => ({ ts: new Date(r.ts), eggs: r.eggs, total: r.total }))
    .sort((a, b) => a.ts.getTime() - b.ts.getTime());
}

/** Drops raw readings of months that ended before `before`; rollups stay. Returns the dropped partitions. */
export async function dropReadingPartitionsBefore(
  db: Queryable,
  before: string,
): Promise<string[]> {
  const result = await db.execute<{ name: string }>(
    sql`SELECT drop_readings_partitions_before(${before}::date) AS name`,
  );
  return result.rows.map((r) => r.name);
}

/**
 * Rolls up the readings held for counters that have just been placed in a house. They were stored while the
 * counter was unknown with their hour rollups only (no house, so no day rollups): those are rebuilt with the
 * rest, so no hour counts twice. Run in the transaction that places them, once.
 */
export async function rollUpHeldReadings(
  db: Queryable,
  farmId: number,
  counterIds: number[],
): Promise<void> {
  if (counterIds.length === 0) return;
  await db.execute(sql`
    DELETE FROM counter_hour_rollups
    WHERE farm_id = ${farmId} AND counter_id = ANY(${sql.param(counterIds)}::int[])`);
  await db.execute(sql`
    WITH held AS (
      SELECT counter_id, ts, eggs FROM readings
      WHERE farm_id = ${farmId} AND counter_id = ANY(${sql.param(counterIds)}::int[])
    ),
    ${rollUp(farmId, 'held')}
    SELECT 1`);
}
