import { createTestDatabase } from '@tierscope/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createEventBus } from '../../platform/events';
import { EvaluationScheduler } from './evaluation-scheduler';
import type { EvaluationService } from './evaluation.service';

let database: Awaited<ReturnType<typeof createTestDatabase>>;
beforeAll(async () => {
  database = await createTestDatabase();
});
afterAll(async () => {
  await database.drop();
});

/** Failures would be logged; this engine has none. */
const noLog = (): undefined => undefined;

/** An engine that only records how many evaluations of each house run at the same moment. */
function recordingEngine() {
  const active = new Map<number, number>();
  const seen = { calls: 0, mostAtOnce: 0 };
  const evaluate = async (houseId: number) => {
    const now = (active.get(houseId) ?? 0) + 1;
    active.set(houseId, now);
    seen.calls += 1;
    seen.mostAtOnce = Math.max(seen.mostAtOnce, now);
    await new Promise((resolve) => setTimeout(resolve, 40));
    active.set(houseId, now - 1);
    return { changed: [] };
  };
  const engine = {
    evaluateNow: evaluate,
    evaluateHistory: evaluate,
    buildMap: () => Promise.resolve(undefined),
    cellDetail: () => Promise.resolve(undefined),
  } satisfies EvaluationService;
  return { engine, seen };
}

describe('the evaluation scheduler in one process', () => {
  it('never evaluates a house twice at once, however many callers ask together', async () => {
    const { engine, seen } = recordingEngine();
    const scheduler = new EvaluationScheduler(database.db, engine, createEventBus(), noLog, {
      intervalMs: 3_600_000,
      holder: 'process-a',
    });
    try {
      // Eight callers at once (readings, the minute sweep, a replay's follow-up…), then eight more while
      // the first evaluation runs.
      const first = Array.from({ length: 8 }, () => scheduler.tick([7]));
      await new Promise((resolve) => setTimeout(resolve, 10));
      const second = Array.from({ length: 8 }, () => scheduler.tick([7]));
      await Promise.all([...first, ...second]);
      await scheduler.idle();
      expect(seen.mostAtOnce).toBe(1);
      // Callers that arrive while one waits join it: it reads what they stored.
      expect(seen.calls).toBeGreaterThanOrEqual(1);
      expect(seen.calls).toBeLessThanOrEqual(3);
    } finally {
      scheduler.dispose();
    }
  });
});
