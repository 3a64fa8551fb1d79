import {
  defaultBeltCounterId,
  defaultCollectorCounterId,
  sectionPositions,
} from '@tierscope/domain';
import { and, eq, isNull } from 'drizzle-orm';
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
  const { adoptedCounterIds } = await layOutHouse(tx, house.id, farmId, house.rows, house.tiers);
  return { ...house, adoptedCounterIds };
}

/**
 * (Re)creates sections and default counters; only for a house that has no readings yet. A default counter
 * id a gateway already posted before the house existed (held as an unmapped counter of the farm) is
 * adopted: that counter joins the house, and its ids of adopted counters are returned so the caller can
 * roll up the readings it held. An id that another house's counter uses is never taken: the new counter
 * gets the next free `-2`, `-3`… instead.
 */
export async function layOutHouse(
  tx: Queryable,
  houseId: number,
  farmId: number,
  rows: number,
  tiers: number,
): Promise<{ adoptedCounterIds: number[] }> {
  await tx.delete(counters).where(eq(counters.houseId, houseId));
  await tx.delete(sections).where(eq(sections.houseId, houseId));
  const positions = sectionPositions(rows, tiers);
  const inserted = await tx
    .insert(sections)
    .values(positions.map((p) => ({ houseId, row: p.row, tier: p.tier })))
    .returning();
  const wanted = [
    ...inserted.map((s) => ({
      sectionId: s.id,
      externalId: defaultBeltCounterId(houseId, s),
      kind: 'belt' as const,
    })),
    { sectionId: null, externalId: defaultCollectorCounterId(houseId), kind: 'collector' as const },
  ];
  const existing = await tx
    .select({ id: counters.id, externalId: counters.externalId, houseId: counters.houseId })
    .from(counters)
    .where(eq(counters.farmId, farmId));
  const byExternalId = new Map(existing.map((c) => [c.externalId, c]));
  const adoptedCounterIds: number[] = [];
  const fresh: (typeof counters.$inferInsert)[] = [];
  for (const counter of wanted) {
    const taken = byExternalId.get(counter.externalId);
    if (taken?.houseId === null) {
      await tx
        .update(counters)
        .set({ houseId, sectionId: counter.sectionId, kind: counter.kind })
        .where(and(eq(counters.id, taken.id), isNull(counters.houseId)));
      adoptedCounterIds.push(taken.id);
      continue;
    }
    let externalId = counter.externalId;
    for (let n = 2; byExternalId.has(externalId); n++) externalId = `${counter.externalId}-${n}`;
    byExternalId.set(externalId, { id: 0, externalId, houseId });
    fresh.push({ farmId, houseId, sectionId: counter.sectionId, externalId, kind: counter.kind });
  }
  if (fresh.length > 0) await tx.insert(counters).values(fresh);
  return { adoptedCounterIds };
}
