import {
  defaultBeltCounterId,
  defaultCollectorCounterId,
  sectionPositions,
} from '@tierscope/domain';
import { eq } from 'drizzle-orm';
import type { Database } from './client';
import { counters, houses, sections } from './schema/index';

/** A transaction or the database itself: both run the same queries. */
export type Queryable = Pick<Database, 'select' | 'insert' | 'update' | 'delete' | 'execute'>;

export interface NewHouse {
  name: string;
  rows: number;
  tiers: number;
  timezone: string;
  lightsOn: string;
  photoperiodHours: number;
  shortfallThresholdPct: number;
  eggPricePerDozen?: number | null;
}

/**
 * Lays out a house's sections and its counters (one belt counter per section, one collector),
 * so a house is never without the cells its counters report into. Call inside a transaction.
 */
export async function insertHouseWithLayout(tx: Queryable, farmId: number, input: NewHouse) {
  const [house] = await tx
    .insert(houses)
    .values({ farmId, ...input })
    .returning();
  if (!house) throw new Error('insert into houses returned no row');
  await layOutHouse(tx, house.id, farmId, house.rows, house.tiers);
  return house;
}

/** (Re)creates sections and default counters; only for a house that has no readings yet. */
export async function layOutHouse(
  tx: Queryable,
  houseId: number,
  farmId: number,
  rows: number,
  tiers: number,
): Promise<void> {
  await tx.delete(counters).where(eq(counters.houseId, houseId));
  await tx.delete(sections).where(eq(sections.houseId, houseId));
  const positions = sectionPositions(rows, tiers);
  const inserted = await tx
    .insert(sections)
    .values(positions.map((p) => ({ houseId, row: p.row, tier: p.tier })))
    .returning();
  await tx.insert(counters).values([
    ...inserted.map((s) => ({
      farmId,
      houseId,
      sectionId: s.id,
      externalId: defaultBeltCounterId(houseId, s),
      kind: 'belt' as const,
    })),
    { farmId, houseId, externalId: defaultCollectorCounterId(houseId), kind: 'collector' as const },
  ]);
}
