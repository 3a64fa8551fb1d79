/**
 * Eggs counted between two running totals of one counter, and what the step was:
 * - `count`: the total rose (or stayed): the difference;
 * - `rollover`: the total passed the counter's maximum and started again (the previous total was within 1 % of
 *   a usual counter maximum and the new one is small): the eggs up to the maximum and after it;
 * - `reset`: the total dropped to near zero (a tenth of what it was or less, or at most RESET_NEAR_ZERO: a power
 *   cycle, a replacement): the counter started again from zero, so the new total is the count since the reset;
 * - `glitch`: the total stepped back a little (1030 → 1029): a misread, reported, never thousands of phantom
 *   eggs; it counts 0 and the earlier total stays the baseline for the next reading;
 * - `baseline`: without an earlier total there is nothing to count from: 0.
 */
export type TotalsStepKind = 'count' | 'rollover' | 'reset' | 'glitch' | 'baseline';

export interface TotalsStep {
  eggs: number;
  kind: TotalsStepKind;
  /** the total the next reading is counted from */
  baseline: number;
}

/** A total at most this low after a higher one is a restart from zero (a belt counts fewer between readings). */
export const RESET_NEAR_ZERO = 200;

/** Maxima counters commonly roll over at: 16- and 32-bit registers and all-nines displays. */
const COUNTER_MAXIMA = [65_535, 99_999, 999_999, 9_999_999, 2 ** 31 - 1, 2 ** 32 - 1];

export function stepFromTotals(previousTotal: number | null, total: number): TotalsStep {
  if (previousTotal === null) return { eggs: 0, kind: 'baseline', baseline: total };
  if (total >= previousTotal)
    return { eggs: total - previousTotal, kind: 'count', baseline: total };
  const maximum = COUNTER_MAXIMA.find(
    (max) => previousTotal <= max && previousTotal >= max * 0.99 && total < max * 0.01,
  );
  if (maximum !== undefined) {
    return { eggs: maximum - previousTotal + total + 1, kind: 'rollover', baseline: total };
  }
  if (total <= Math.max(previousTotal / 10, RESET_NEAR_ZERO)) {
    return { eggs: total, kind: 'reset', baseline: total };
  }
  return { eggs: 0, kind: 'glitch', baseline: previousTotal };
}

/** Eggs between two running totals (see stepFromTotals). */
export function intervalFromTotals(previousTotal: number | null, total: number): number {
  return stepFromTotals(previousTotal, total).eggs;
}

/** Interval counts for a time-ordered run of totals that follows `previousTotal`. */
export function intervalsFromTotals(
  previousTotal: number | null,
  totals: readonly number[],
): number[] {
  const eggs: number[] = [];
  let previous = previousTotal;
  for (const total of totals) {
    const step = stepFromTotals(previous, total);
    eggs.push(step.eggs);
    previous = step.baseline;
  }
  return eggs;
}
