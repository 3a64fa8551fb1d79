import { describe, expect, it } from 'vitest';
import { intervalFromTotals, intervalsFromTotals, stepFromTotals } from './running-totals';

describe('intervalsFromTotals', () => {
  it('turns a rising total into the eggs between readings', () => {
    expect(intervalsFromTotals(1000, [1012, 1030, 1030, 1051])).toEqual([12, 18, 0, 21]);
  });

  it('treats a total that drops to near zero as a reset and counts from zero', () => {
    // 1030 → 7: the counter restarted and has counted 7 since; not −1023 eggs.
    expect(intervalsFromTotals(1000, [1030, 7, 19])).toEqual([30, 7, 12]);
  });

  it('treats a small step back as a glitch: no phantom eggs, and the next reading counts from before it', () => {
    // 1030 → 1029 was read as a reset before: 1,029 phantom eggs.
    expect(intervalsFromTotals(1000, [1030, 1029, 1035])).toEqual([30, 0, 5]);
    expect(stepFromTotals(1030, 1029)).toEqual({ eggs: 0, kind: 'glitch', baseline: 1030 });
    expect(stepFromTotals(1030, 900).kind).toBe('glitch');
  });

  it('counts through a rollover at a 16-bit or all-nines maximum', () => {
    // 65,530 → 65,535 (5 eggs) → 0 (1 egg) → 4 (4 eggs): 65,530 → 4 is 10 eggs.
    expect(stepFromTotals(65_530, 4)).toEqual({ eggs: 10, kind: 'rollover', baseline: 4 });
    expect(stepFromTotals(999_990, 20)).toEqual({ eggs: 30, kind: 'rollover', baseline: 20 });
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
      [1030, 1029],
    ] as const) {
      expect(intervalFromTotals(previous, total)).toBeGreaterThanOrEqual(0);
    }
  });
});
