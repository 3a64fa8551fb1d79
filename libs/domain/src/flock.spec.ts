import { sampleCorrelation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  ageInWeeks,
  compartmentalLay,
  cumulativeMortalityPct,
  eggsPerHenHoused,
  henDayProductionPct,
  henDays,
  henHousedProductionPct,
  hensAliveByDay,
  livabilityPct,
  rSquared,
} from './flock';

describe('hen-day production against published worked examples', () => {
  // E1: "Calculating Agriculture", ch. 12 "Poultry Science", p. 12-11 — 345,000 hens through May (31 days),
  // 9,090,750 eggs: hen-days 10,695,000 and hen-day production 85.0 %.
  it('E1: a month without losses', () => {
    const days = henDays(345_000, [], 31);
    expect(days).toBe(10_695_000);
    expect(henDayProductionPct(9_090_750, days)).toBeCloseTo(85.0, 10);
    // Without losses hen-day and hen-housed production are the same (IASRI).
    expect(henHousedProductionPct(9_090_750, 345_000, 31)).toBeCloseTo(85.0, 10);
  });

  // E2: same page — 200 birds on 1 March; 4 died on the 12th; 10 added on the 16th; 3,852 eggs.
  // The book counts a dead bird up to the day before it died and an added bird from the day after:
  // 200×31 + 10×(31−16) − 4×(31−11) = 6,270 hen-days; 3,852 / 6,270 = 61.4 %.
  it('E2: a pen with deaths and additions, by the book’s convention', () => {
    const changes = [
      { day: 12, change: -4 },
      { day: 16, change: 10 },
    ];
    const days = henDays(200, changes, 31, 'textbook');
    expect(days).toBe(6_270);
    expect(henDayProductionPct(3_852, days)).toBeCloseTo(61.4, 1);
  });

  it('E2 by the product’s convention counts the dead birds on their last day and the new ones from theirs', () => {
    // 200×31 + 10×(31−15) − 4×(31−12) = 6,200 + 160 − 76 = 6,284.
    expect(
      henDays(
        200,
        [
          { day: 12, change: -4 },
          { day: 16, change: 10 },
        ],
        31,
      ),
    ).toBe(6_284);
  });

  // E3: thebigbookproject.org (a blog) — 10,000 housed, 100 dead by week 25, 9,108 eggs on one day:
  // HDEP 92.0 % (9,108 / 9,900), HHEP 91.08 % (9,108 / 10,000).
  it('E3: one day after losses', () => {
    expect(henDayProductionPct(9_108, 9_900)).toBeCloseTo(92.0, 1);
    expect(henHousedProductionPct(9_108, 10_000, 1)).toBeCloseTo(91.08, 2);
  });
});

describe('flock figures', () => {
  it('eggs per hen housed, cumulative mortality and livability (IASRI; mortality as common practice)', () => {
    expect(eggsPerHenHoused(2_950_000, 10_000)).toBe(295);
    expect(cumulativeMortalityPct(100, 10_000)).toBe(1);
    expect(livabilityPct(100, 10_000)).toBe(99);
    expect(eggsPerHenHoused(10, 0)).toBeNull();
  });

  it('hens alive per day leave the day after a loss, and only while the flock is in the house', () => {
    const alive = hensAliveByDay(
      { placedOn: '2026-11-02', hensHoused: 1000, endedOn: '2026-11-05' },
      [
        { date: '2026-11-03', dead: 2, culled: 1 },
        { date: '2026-11-04', dead: 1, culled: 0 },
      ],
      '2026-11-01',
      '2026-11-06',
    );
    expect([...alive]).toEqual([
      ['2026-11-02', 1000],
      ['2026-11-03', 1000],
      ['2026-11-04', 997],
      ['2026-11-05', 996],
    ]);
  });

  it('ages in whole weeks from the age at placement', () => {
    expect(ageInWeeks('2026-01-01', 17, '2026-01-07')).toBe(17);
    expect(ageInWeeks('2026-01-01', 17, '2026-01-08')).toBe(18);
  });
});

describe('the compartmental lay curve and its goodness of fit', () => {
  it('is zero before first egg, rises to a peak and declines slowly', () => {
    // The equation is from memory (TRADE-FACTS §3 [M]) and these parameters are ours: the check is that the
    // model can take IASRI's published shape (TRADE-FACTS §2 [S]): lay from ≈ 21 weeks, ≥ 90 % by 28 weeks and
    // holding to 40–42 weeks, ≤ 70 % by 72 weeks — each point asserted as published, not loosened.
    const p = { a: 126, b: 0.0082, c: 0.35, d: 19 };
    expect(compartmentalLay(18, p)).toBe(0);
    expect(compartmentalLay(28, p)).toBeGreaterThanOrEqual(90);
    // "holds to 40–42 weeks": at least to 40, the start of that range.
    for (const week of [32, 36, 40]) expect(compartmentalLay(week, p)).toBeGreaterThanOrEqual(90);
    expect(compartmentalLay(72, p)).toBeLessThanOrEqual(70);
    const weeks = Array.from({ length: 60 }, (_, i) => 19 + i);
    const lay = weeks.map((t) => compartmentalLay(t, p));
    expect(Math.max(...lay)).toBeLessThanOrEqual(100);
  });

  it('R² equals the squared correlation for a least-squares straight line (checked with simple-statistics)', () => {
    const x = [1, 2, 3, 4, 5, 6];
    const y = [2.1, 3.9, 6.2, 7.8, 10.1, 12.2];
    // The least-squares line by the normal equations.
    const n = x.length;
    const mx = x.reduce((s, v) => s + v, 0) / n;
    const my = y.reduce((s, v) => s + v, 0) / n;
    const slope =
      x.reduce((s, v, i) => s + (v - mx) * ((y[i] ?? 0) - my), 0) /
      x.reduce((s, v) => s + (v - mx) ** 2, 0);
    const fitted = x.map((v) => my + slope * (v - mx));
    expect(rSquared(y, fitted)).toBeCloseTo(sampleCorrelation(x, y) ** 2, 12);
  });
});
