import { rollUpHeldReadings } from '../ingest/ingest.repository';
import {
  insertHouseWithLayout,
  layOutHouse,
  schema,
  type NewHouse,
  type Queryable,
} from '@tierscope/db';
import { asc, eq, sql } from 'drizzle-orm';

const { houses, counters, sections, readings } = schema;

export type HouseRow = typeof houses.$inferSelect;

export async function listHousesOfFarm(db: Queryable, farmId: number): Promise<HouseRow[]> {
  return db.select().from(houses).where(eq(houses.farmId, farmId)).orderBy(asc(houses.name));
}

export async function findHouse(db: Queryable, id: number): Promise<HouseRow | undefined> {
  const [row] = await db.select().from(houses).where(eq(houses.id, id));
  return row;
}

export async function countersOfHouse(db: Queryable, houseId: number) {
  return db
    .select({
      id: counters.id,
      externalId: counters.externalId,
      kind: counters.kind,
      row: sections.row,
      tier: sections.tier,
      active: counters.active,
    })
    .from(counters)
    .leftJoin(sections, eq(sections.id, counters.sectionId))
    .where(eq(counters.houseId, houseId))
    .orderBy(sql`${counters.kind} = 'collector'`, asc(sections.row), asc(sections.tier));
}

export async function createHouse(
  db: Queryable,
  farmId: number,
  input: NewHouse,
): Promise<HouseRow> {
  const { adoptedCounterIds, ...house } = await insertHouseWithLayout(db, farmId, input);
  await rollUpHeldReadings(db, farmId, adoptedCounterIds);
  return house;
}

export async function updateHouse(db: Queryable, id: number, patch: Partial<NewHouse>) {
  const [row] = await db.update(houses).set(patch).where(eq(houses.id, id)).returning();
  return row;
}

export async function relayOutHouse(db: Queryable, house: HouseRow): Promise<void> {
  const { adoptedCounterIds } = await layOutHouse(
    db,
    house.id,
    house.farmId,
    house.rows,
    house.tiers,
  );
  await rollUpHeldReadings(db, house.farmId, adoptedCounterIds);
}

export async function deleteHouse(db: Queryable, id: number): Promise<void> {
  await db.delete(houses).where(eq(houses.id, id));
}

/** True once any counter of the house has sent a reading; such a house keeps its layout and history. */
export async function houseHasReadings(db: Queryable, houseId: number): Promise<boolean> {
  const result = await db.execute<{ found: boolean }>(
    sql`select exists (select 1 from ${readings} r join ${counters} c on c.id = r.counter_id
        where c.house_id = ${houseId}) as found`,
  );
  return result.rows[0]?.found === true;
}

export async function houseNameTaken(
  db: Queryable,
  farmId: number,
  name: string,
  exceptId?: number,
) {
  const result = await db.execute<{ found: boolean }>(
    sql`select exists (select 1 from ${houses} where farm_id = ${farmId} and name = ${name}
        and id <> ${exceptId ?? 0}) as found`,
  );
  return result.rows[0]?.found === true;
}
