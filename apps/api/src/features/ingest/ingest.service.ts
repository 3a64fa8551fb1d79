import {
  MAX_FUTURE_SKEW_MS,
  MAX_READINGS_PER_BATCH,
  readingInputSchema,
  type IngestResult,
} from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { stepFromTotals, type TotalsStep } from '@tierscope/domain';
import { AppError } from '../../platform/errors';
import type { EventBus } from '../../platform/events';
import { withRetryOnConflict } from '../../platform/transactions';
import {
  adjustReadings,
  ensureReadingPartitions,
  insertReadings,
  lockCounters,
  readingsAround,
  resolveCounters,
  type ReadingRows,
} from './ingest.repository';

export interface GatewayContext {
  gatewayId: number;
  farmId: number;
}

interface Valid {
  index: number;
  counter: string;
  ts: Date;
  eggs?: number | undefined;
  total?: number | undefined;
}

export interface IngestService {
  ingest(gateway: GatewayContext, readings: unknown[]): Promise<IngestResult>;
}

export function createIngestService(
  db: Database,
  events: EventBus,
  now: () => Date = () => new Date(),
): IngestService {
  const knownMonths = new Set<string>();

  async function ensureMonths(items: Valid[]): Promise<void> {
    const months = [...new Set(items.map((r) => `${r.ts.toISOString().slice(0, 7)}-01`))].filter(
      (m) => !knownMonths.has(m),
    );
    // Partition DDL runs outside the batch's transaction so it never holds the batch's locks.
    await ensureReadingPartitions(db, months);
    for (const m of months) knownMonths.add(m);
  }

  return {
    async ingest(gateway, readings) {
      if (readings.length > MAX_READINGS_PER_BATCH) {
        throw new AppError(
          'payload_too_large',
          `A batch holds at most ${MAX_READINGS_PER_BATCH} readings`,
        );
      }
      const rejected: IngestResult['rejected'] = [];
      const latestAllowed = now().getTime() + MAX_FUTURE_SKEW_MS;
      const seen = new Set<string>();
      let duplicates = 0;
      const valid: Valid[] = [];
      readings.forEach((raw, index) => {
        const parsed = readingInputSchema.safeParse(raw);
        if (!parsed.success) {
          const issue = parsed.error.issues[0];
          const field = issue?.path.join('.');
          rejected.push({
            index,
            reason: issue
              ? field
                ? `${field}: ${issue.message}`
                : issue.message
              : 'invalid reading',
          });
          return;
        }
        const ts = new Date(parsed.data.ts);
        if (ts.getTime() > latestAllowed) {
          rejected.push({ index, reason: 'ts: more than 5 minutes in the future' });
          return;
        }
        const key = `${parsed.data.counter}\u0000${ts.getTime()}`;
        if (seen.has(key)) {
          duplicates += 1;
          return;
        }
        seen.add(key);
        valid.push({
          index,
          counter: parsed.data.counter,
          ts,
          eggs: parsed.data.eggs,
          total: parsed.data.total,
        });
      });

      const counters = await resolveCounters(db, gateway.farmId, [
        ...new Set(valid.map((r) => r.counter)),
      ]);
      const unknown = [...counters.values()].filter((c) => c.houseId === null);
      const unmappedCounters = unknown.map((c) => c.externalId).sort();
      await ensureMonths(valid);

      const outcome = await withRetryOnConflict(() =>
        db.transaction(async (tx) => {
          const intervals: ReadingRows = { counterIds: [], ts: [], eggs: [], totals: [] };
          const byCounterTotals = new Map<number, Valid[]>();
          for (const r of valid) {
            const counter = counters.get(r.counter);
            if (!counter) continue;
            if (r.eggs !== undefined) {
              intervals.counterIds.push(counter.id);
              intervals.ts.push(r.ts.toISOString());
              intervals.eggs.push(r.eggs);
              intervals.totals.push(null);
            } else {
              const list = byCounterTotals.get(counter.id) ?? [];
              list.push(r);
              byCounterTotals.set(counter.id, list);
            }
          }
          // Counters sending running totals take turns (see prepareTotals); so do unknown counters, so that
          // a batch lands wholly before or after one is placed. One statement, in id order: no deadlocks.
          await lockCounters(tx, [
            ...new Set([...byCounterTotals.keys(), ...unknown.map((c) => c.id)]),
          ]);
          const fromTotals = await prepareTotals(tx, gateway.farmId, byCounterTotals);
          const merged: ReadingRows = {
            counterIds: [...intervals.counterIds, ...fromTotals.inserts.counterIds],
            ts: [...intervals.ts, ...fromTotals.inserts.ts],
            eggs: [...intervals.eggs, ...fromTotals.inserts.eggs],
            totals: [...intervals.totals, ...fromTotals.inserts.totals],
          };
          const result = await insertReadings(tx, gateway.farmId, merged);
          await adjustReadings(tx, gateway.farmId, fromTotals.adjustments);
          return result;
        }),
      );

      for (const house of outcome.perHouse) {
        events.emit('readings.accepted', {
          farmId: gateway.farmId,
          houseId: house.houseId,
          readingsAdded: house.added,
          eggsAdded: house.eggs,
          firstTs: house.firstTs,
          lastTs: house.lastTs,
        });
      }
      return {
        accepted: outcome.added,
        duplicates: duplicates + (valid.length - outcome.added),
        rejected,
        unmappedCounters,
      };
    },
  };
}

/**
 * Turns running totals into interval counts against what is already stored. Totals may arrive out of
 * order: the stored reading right after a late one is then recounted from the late one's total, and the
 * difference is applied to it and its rollups. The caller has locked the counters, so two batches for one
 * counter take turns.
 */
async function prepareTotals(
  tx: Parameters<Parameters<Database['transaction']>[0]>[0],
  farmId: number,
  byCounter: Map<number, Valid[]>,
): Promise<{
  inserts: ReadingRows;
  adjustments: { counterIds: number[]; ts: Date[]; deltas: number[] };
}> {
  const inserts: ReadingRows = { counterIds: [], ts: [], eggs: [], totals: [] };
  const adjustments = { counterIds: [] as number[], ts: [] as Date[], deltas: [] as number[] };
  if (byCounter.size === 0) return { inserts, adjustments };
  const ids = [...byCounter.keys()].sort((a, b) => a - b);
  for (const counterId of ids) {
    const incoming = (byCounter.get(counterId) ?? []).sort(
      (a, b) => a.ts.getTime() - b.ts.getTime(),
    );
    const first = incoming[0];
    const last = incoming.at(-1);
    if (!first || !last) continue;
    const stored = await readingsAround(tx, farmId, counterId, first.ts, last.ts);
    const storedAt = new Set(stored.map((s) => s.ts.getTime()));
    type Entry = { ts: Date; total: number | null; storedEggs: number | null };
    const sequence: Entry[] = [
      ...stored.map((s) => ({ ts: s.ts, total: s.total, storedEggs: s.eggs })),
      ...incoming
        .filter((r) => !storedAt.has(r.ts.getTime()))
        .map((r) => ({ ts: r.ts, total: r.total ?? null, storedEggs: null })),
    ].sort((a, b) => a.ts.getTime() - b.ts.getTime());
    let previousTotal: number | null = null;
    let hasNewBefore = false;
    for (const entry of sequence) {
      const step: TotalsStep | null =
        entry.total === null ? null : stepFromTotals(previousTotal, entry.total);
      if (entry.storedEggs === null) {
        const eggs = step?.eggs ?? 0;
        inserts.counterIds.push(counterId);
        inserts.ts.push(entry.ts.toISOString());
        inserts.eggs.push(eggs);
        inserts.totals.push(entry.total);
        hasNewBefore = true;
      } else if (hasNewBefore && entry.total !== null) {
        // A stored total whose predecessor just changed: recount it.
        const eggs = step?.eggs ?? 0;
        if (eggs !== entry.storedEggs) {
          adjustments.counterIds.push(counterId);
          adjustments.ts.push(entry.ts);
          adjustments.deltas.push(eggs - entry.storedEggs);
        }
        hasNewBefore = false;
      } else {
        hasNewBefore = false;
      }
      // A glitch (a total a little below the one before) keeps the earlier total as the baseline.
      previousTotal = step ? step.baseline : entry.total;
    }
  }
  return { inserts, adjustments };
}
