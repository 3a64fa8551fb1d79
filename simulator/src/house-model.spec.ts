import type { SimulatorHouse } from '@tierscope/contracts';
import { describe, expect, it } from 'vitest';
import { parseFault } from './faults';
import { HouseModel } from './house-model';
import { generator, poisson } from './random';

const house: SimulatorHouse = {
  name: 'House 1',
  rows: 6,
  tiers: 3,
  timezone: 'America/Chicago',
  lightsOn: '04:00',
  photoperiodHours: 16,
  hensHoused: 36000,
  flockAgeWeeks: 30,
  counters: [
    ...Array.from({ length: 18 }, (_, i) => ({
      externalId: `B${i}`,
      kind: 'belt' as const,
      row: Math.floor(i / 3) + 1,
      tier: (i % 3) + 1,
    })),
    { externalId: 'C', kind: 'collector' as const, row: null, tier: null },
  ],
};
const start = new Date('2026-11-20T00:00:00Z');

/** One production day of readings at 15-minute steps, from lights-on (10:00 UTC in November). */
function day(model: HouseModel, dayStart = new Date('2026-11-20T10:00:00Z')) {
  const all = [];
  for (let t = 1; t <= 96; t++) {
    all.push(
      ...model.readingsFor(
        new Date(dayStart.getTime() + (t - 1) * 900_000),
        new Date(dayStart.getTime() + t * 900_000),
      ),
    );
  }
  return all;
}
const sumBy = (readings: { counter: string; eggs: number }[], ids: string[]) =>
  readings.filter((r) => ids.includes(r.counter)).reduce((n, r) => n + r.eggs, 0);

describe('poisson', () => {
  it('has the mean it was asked for, for small and large means', () => {
    const random = generator(7);
    for (const lambda of [3, 200]) {
      const draws = Array.from({ length: 4000 }, () => poisson(lambda, random));
      const mean = draws.reduce((a, b) => a + b, 0) / draws.length;
      expect(Math.abs(mean - lambda)).toBeLessThan(4 * Math.sqrt(lambda / draws.length));
    }
  });
});

describe('HouseModel', () => {
  it('gives the same eggs for the same seed, and other eggs for another seed', () => {
    const a = day(new HouseModel(house, { seed: 1, start }));
    const b = day(new HouseModel(house, { seed: 1, start }));
    const c = day(new HouseModel(house, { seed: 2, start }));
    expect(a).toEqual(b);
    expect(a).not.toEqual(c);
  });

  it('lays about hens × lay rate in a day, and nothing in the dark', () => {
    const readings = day(new HouseModel(house, { seed: 3, start }));
    const belts = house.counters.filter((c) => c.kind === 'belt').map((c) => c.externalId);
    const eggs = sumBy(readings, belts);
    // At 30 weeks the curve gives ≈ 96 % and ≈ 98 % of the hens are alive: ≈ 34,000 eggs.
    expect(eggs).toBeGreaterThan(32_000);
    expect(eggs).toBeLessThan(35_000);
    const dark = readings.filter(
      (r) => r.ts > '2026-11-21T02:15:00Z' && r.ts <= '2026-11-21T10:00:00Z' && r.counter !== 'C',
    );
    expect(dark.every((r) => r.eggs === 0)).toBe(true);
  });

  it('makes the collector count the belts', () => {
    const readings = day(new HouseModel(house, { seed: 4, start }));
    const belts = house.counters.filter((c) => c.kind === 'belt').map((c) => c.externalId);
    expect(sumBy(readings, ['C'])).toBe(sumBy(readings, belts));
  });

  it('plants a feed fault on one row and a dead counter on one section', () => {
    const faults = [
      parseFault('feed:house=House 1,row=3,drop=0.2', start),
      parseFault('silent:house=House 1,row=5,tier=2', start),
    ];
    const healthy = day(new HouseModel(house, { seed: 5, start }));
    const faulty = day(new HouseModel(house, { seed: 5, start, faults }));
    const row3 = house.counters.filter((c) => c.row === 3).map((c) => c.externalId);
    expect(sumBy(faulty, row3) / sumBy(healthy, row3)).toBeCloseTo(0.8, 1);
    expect(sumBy(faulty, ['B13'])).toBe(0);
    // The dead counter's eggs were still laid: the collector still counts them.
    expect(sumBy(faulty, ['C'])).toBeGreaterThan(
      sumBy(
        faulty,
        house.counters.filter((c) => c.kind === 'belt').map((c) => c.externalId),
      ),
    );
  });
});
