/**
 * Eggs counted between two running totals of one counter. A total lower than the one before is a counter
 * reset (power cycle, replacement): the counter started again from zero, so the new total is the count
 * since the reset — never a negative number of eggs. Without an earlier total there is nothing to count
 * from, so the first total is the baseline and counts 0.
 */
export function intervalFromTotals(previousTotal: number | null, total: number): number {
  if (previousTotal === null) return 0;
  return total >= previousTotal ? total - previousTotal : total;
}

/** Interval counts for a time-ordered run of totals that follows `previousTotal`. */
export function intervalsFromTotals(
  previousTotal: number | null,
  totals: readonly number[],
): number[] {
  const eggs: number[] = [];
  let previous = previousTotal;
  for (const total of totals) {
    eggs.push(intervalFromTotals(previous, total));
    previous = total;
  }
  return eggs;
}
