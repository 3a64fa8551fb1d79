import { schema, type Queryable } from '@tierscope/db';
import { and, asc, desc, eq, isNull, sql } from 'drizzle-orm';

const { flocks, mortality, sections } = schema;

export type FlockRow = typeof flocks.$inferSelect;

export async function flocksOfHouse(db: Queryable, houseId: number): Promise<FlockRow[]> {
  return db
    .select()
    .from(flocks)
    .where(eq(flocks.houseId, houseId))
    .orderBy(desc(flocks.placedOn), desc(flocks.id));
}

export async function findFlock(db: Queryable, id: number): Promise<FlockRow | undefined> {
  const [row] = await db.select().from(flocks).where(eq(flocks.id, id));
  return row;
}

export async function activeFlock(db: Queryable, houseId: number): Promise<FlockRow | undefined> {
  const [row] = await db
    .select()
    .from(flocks)
    .where(and(eq(flocks.houseId, houseId), isNull(flocks.endedOn)));
  return row;
}

export async function insertFlock(db: Queryable, values: typeof flocks.$inferInsert) {
  const [row] = await db.insert(flocks).values(values).returning();
  if (!row) throw new Error('flock not inserted');
  return row;
}

export async function updateFlock(
  db: Queryable,
  id: number,
  patch: Partial<typeof flocks.$inferInsert>,
) {
  const [row] = await db.update(flocks).set(patch).where(eq(flocks.id, id)).returning();
  return row;
}

export async function setSectionBirds(
  db: Queryable,
  houseId: number,
  birds: { row: number; tier: number; birds: number }[] | null,
): Promise<void> {
  await db.update(sections).set({ birdCount: null }).where(eq(sections.houseId, houseId));
  for (const b of birds ?? []) {
    await db
      .update(sections)
      .set({ birdCount: b.birds })
      .where(
        and(eq(sections.houseId, houseId), eq(sections.row, b.row), eq(sections.tier, b.tier)),
      );
  }
}

export async function lossesOf(db: Queryable, flockId: number) {
  return db
    .select({ date: mortality.date, dead: mortality.dead, culled: mortality.culled })
    .from(mortality)
    .where(eq(mortality.flockId, flockId))
    .orderBy(asc(mortality.date));
}

export async function upsertLoss(
  db: Queryable,
  flockId: number,
  date: string,
  entry: { dead: number; culled: number },
) {
  await db
    .insert(mortality)
    .values({ flockId, date, ...entry })
    .onConflictDoUpdate({ target: [mortality.flockId, mortality.date], set: entry });
}

/** Eggs per production day of a house: the belts summed, and the collector. */
export async function houseDays(db: Queryable, houseId: number, firstDay: string, lastDay: string) {
  const result = await db.execute<{
    day: string;
    belts: number | null;
    collector: number | null;
  }>(sql`
    WITH belts AS (
      SELECT d.day, sum(d.eggs)::int AS eggs FROM section_day_rollups d
      JOIN sections s ON s.id = d.section_id
      WHERE s.house_id = ${houseId} AND d.day BETWEEN ${firstDay}::date AND ${lastDay}::date
      GROUP BY d.day),
    collector AS (
      SELECT day, eggs FROM collector_day_rollups
      WHERE house_id = ${houseId} AND day BETWEEN ${firstDay}::date AND ${lastDay}::date)
    SELECT coalesce(b.day, c.day)::text AS day, b.eggs AS belts, c.eggs AS collector
    FROM belts b FULL JOIN collector c ON c.day = b.day
    ORDER BY 1`);
  return new Map(result.rows.map((r) => [r.day, { belts: r.belts, collector: r.collector }]));
}
