import { mean, variance } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { binomial, RealisticHouse, SLOT_MINUTES, SLOTS_PER_DAY } from './realistic';
import { generator } from './random';

describe('binomial', () => {
  it('has the mean np and variance np(1 − p) of the binomial law (checked with simple-statistics)', () => {
    const random = generator(42);
    for (const [n, p] of [
      [860, 0.9],
      [40, 0.1],
      [300, 0.97],
    ] as const) {
      const draws = Array.from({ length: 4000 }, () => binomial(n, p, random));
      expect(mean(draws)).toBeCloseTo(n * p, 0);
      expect(variance(draws) / (n * p * (1 - p))).toBeGreaterThan(0.85);
      expect(variance(draws) / (n * p * (1 - p))).toBeLessThan(1.15);
      expect(Math.max(...draws)).toBeLessThanOrEqual(n);
    }
  });
});

/** Hours after lights-on by which half of a day's eggs were laid, over every section. */
function medianLayHour(house: RealisticHouse, day: number): number {
  const data = house.dayData(day);
  const bySlot = new Array<number>(SLOTS_PER_DAY).fill(0);
  for (const s of data.sections) s.laid.forEach((eggs, j) => (bySlot[j] = (bySlot[j] ?? 0) + eggs));
  const total = bySlot.reduce((a, b) => a + b, 0);
  let sum = 0;
  for (let j = 0; j < SLOTS_PER_DAY; j++) {
    sum += bySlot[j] ?? 0;
    if (sum >= total / 2) return ((j + 1) * SLOT_MINUTES) / 60;
  }
  return 24;
}

describe('RealisticHouse', () => {
  it('lays half of a white flock’s eggs ≈ 5 h after lights-on, a brown flock’s ≈ 1.3 h earlier', () => {
    // Patterson (1997): 50 % within 13 h of the start of dark, ≈ 5 h after lights-on on 16L:8D
    // (TRADE-FACTS §2 [S]/[C]); brown hybrids lay 1.2–1.4 h earlier (TRADE-FACTS §2 [S]).
    const white = medianLayHour(new RealisticHouse({ rows: 6, tiers: 3, seed: 1 }), 3);
    const brown = medianLayHour(
      new RealisticHouse({ rows: 6, tiers: 3, seed: 1, breed: 'brown' }),
      3,
    );
    expect(white).toBeGreaterThanOrEqual(4.5);
    expect(white).toBeLessThanOrEqual(5.5);
    expect(white - brown).toBeGreaterThanOrEqual(1);
    expect(white - brown).toBeLessThanOrEqual(1.6);
  });

  it('gives a section about hens × lay rate a day, with day-to-day noise beyond counting noise', () => {
    const house = new RealisticHouse({ rows: 6, tiers: 3, seed: 2 });
    const totals = Array.from({ length: 40 }, (_, d) =>
      house.dayData(d).sections[7]!.counted.reduce((a, b) => a + b, 0),
    );
    const expected = house.dayData(0).sections[7]!.expectedWithoutFault;
    expect(mean(totals) / expected).toBeGreaterThan(0.97);
    expect(mean(totals) / expected).toBeLessThan(1.03);
    // Binomial counting alone gives a CV of about 1 %; with the 2.5 % section factor it is larger.
    const cv = Math.sqrt(variance(totals)) / mean(totals);
    expect(cv).toBeGreaterThan(0.018);
    expect(cv).toBeLessThan(0.05);
  });

  it('is the same house-day however often it is asked for', () => {
    const a = new RealisticHouse({ rows: 4, tiers: 2, seed: 9 }).dayData(5);
    const b = new RealisticHouse({ rows: 4, tiers: 2, seed: 9 }).dayData(5);
    expect(Array.from(a.sections[3]!.counted)).toEqual(Array.from(b.sections[3]!.counted));
    expect(Array.from(a.collector)).toEqual(Array.from(b.collector));
  });

  it('lets a dead belt counter count nothing while the collector still counts its eggs', () => {
    const faults = [{ kind: 'dead' as const, row: 2, tier: 1, onsetSlot: 4 * SLOTS_PER_DAY }];
    const house = new RealisticHouse({
      rows: 4,
      tiers: 2,
      seed: 3,
      faults,
      glitchesPerCounterDay: 0,
    });
    const day = house.dayData(5);
    const dead = day.sections.find((s) => s.row === 2 && s.tier === 1)!;
    expect(dead.counted.reduce((a, b) => a + b, 0)).toBe(0);
    expect(dead.laid.reduce((a, b) => a + b, 0)).toBeGreaterThan(500);
    const belts = day.sections.reduce((n, s) => n + s.counted.reduce((a, b) => a + b, 0), 0);
    const collector = day.collector.reduce((a, b) => a + b, 0);
    expect(collector - belts).toBeGreaterThan(500);
  });

  it('holds a late gateway’s readings until its backlog is sent', () => {
    const house = new RealisticHouse({
      rows: 2,
      tiers: 1,
      seed: 4,
      faults: [{ kind: 'late-gateway', hours: 4, onsetSlot: 100 }],
    });
    expect(house.arrivalSlot(99)).toBe(99);
    expect(house.arrivalSlot(100)).toBe(116);
    expect(house.arrivalSlot(115)).toBe(116);
    expect(house.arrivalSlot(116)).toBe(116);
  });
});
