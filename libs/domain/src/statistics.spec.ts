import jStat from 'jstat';
import { median as referenceMedian, quantile } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { median, normalUpperTail, poissonLowerTail } from './statistics';

describe('median', () => {
  // Checked against simple-statistics (a general-purpose reference library).
  it('agrees with simple-statistics for odd and even counts', () => {
    for (const list of [[3], [5, 1, 4], [10, 12, 12, 13, 12, 11, 14, 300], [2.5, 7, 1, 9, 4, 4]]) {
      expect(median(list)).toBeCloseTo(referenceMedian(list), 12);
      expect(median(list)).toBeCloseTo(quantile(list, 0.5), 12);
    }
  });

  it('is not moved by one wild value (the MZ1 data: median 12)', () => {
    // Fixture MZ1 of TRADE-FACTS.md §5: a calculator example (codingace.net), not a NIST example; the
    // modified z-score it illustrates is described in the NIST/SEMATECH e-Handbook §1.3.5.17.
    expect(median([10, 12, 12, 13, 12, 11, 14, 300])).toBe(12);
  });

  it('is NaN for nothing', () => {
    expect(median([])).toBeNaN();
  });
});

describe('poissonLowerTail', () => {
  // Checked against jStat's Poisson CDF (a general-purpose reference library from the registry).
  it('agrees with jStat for small and moderate means', () => {
    for (const [k, lambda] of [
      [0, 1],
      [3, 5],
      [10, 10],
      [20, 25],
      [85, 100],
    ] as const) {
      expect(poissonLowerTail(k, lambda)).toBeCloseTo(jStat.poisson.cdf(k, lambda), 9);
    }
  });

  it("agrees with jStat's regularized gamma for day-sized counts (its Poisson CDF overflows there)", () => {
    for (const [k, lambda] of [
      [170, 200],
      [1620, 1800],
      [9000, 10000],
    ] as const) {
      const reference = 1 - jStat.lowRegGamma(k + 1, lambda);
      expect(Math.abs(poissonLowerTail(k, lambda) - reference)).toBeLessThan(
        1e-9 + 1e-6 * reference,
      );
    }
  });

  it('gives the textbook value P(X ≤ 2 | λ = 5) = 0.124652 (e^-5 (1 + 5 + 12.5))', () => {
    expect(poissonLowerTail(2, 5)).toBeCloseTo(Math.exp(-5) * 18.5, 12);
  });

  it('stays accurate for the large counts of a whole day', () => {
    // 1,620 eggs where 1,800 were expected (10 % short): z ≈ −4.24, normal tail ≈ 1.1e-5.
    const p = poissonLowerTail(1620, 1800);
    expect(p).toBeGreaterThan(1e-6);
    expect(p).toBeLessThan(1e-4);
    expect(poissonLowerTail(1800, 1800)).toBeCloseTo(0.5, 1);
  });
});

describe('normalUpperTail', () => {
  it('agrees with jStat', () => {
    for (const z of [-2, 0, 1, 1.96, 3.5]) {
      expect(normalUpperTail(z)).toBeCloseTo(1 - jStat.normal.cdf(z, 0, 1), 6);
    }
  });
});
