import { describe, expect, it } from 'vitest';
import { intervalFromTotals, intervalsFromTotals } from './running-totals';

describe('intervalsFromTotals', () => {
  it('turns a rising total into the eggs between readings', () => {
    expect(intervalsFromTotals(1000, [1012, 1030, 1030, 1051])).toEqual([12, 18, 0, 21]);
  });

  it('treats a total that goes down as a reset and counts from zero', () => {
    // 1030 → 7: the counter restarted and has counted 7 since; not −1023 eggs.
    expect(intervalsFromTotals(1000, [1030, 7, 19])).toEqual([30, 7, 12]);
  });

  it('uses the first total ever seen as the baseline', () => {
    expect(intervalsFromTotals(null, [500, 520])).toEqual([0, 20]);
  });

  it('never returns a negative count', () => {
    for (const [previous, total] of [
      [10, 3],
      [0, 0],
      [5, 5],
      [2 ** 31 - 1, 0],
    ] as const) {
      expect(intervalFromTotals(previous, total)).toBeGreaterThanOrEqual(0);
    }
  });
});
