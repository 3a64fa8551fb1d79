import type { SimulatorHouse } from '@tierscope/contracts';
import { productionDayStart } from '@tierscope/domain';
import { describe, expect, it } from 'vitest';
import { parseFault } from './faults';
import { RealisticHouseModel } from './realistic-model';

const house: SimulatorHouse = {
  name: 'House 1',
  rows: 3,
  tiers: 2,
  timezone: 'America/Chicago',
  lightsOn: '04:00',
  photoperiodHours: 16,
  hensHoused: 12_000,
  flockAgeWeeks: 40,
  counters: [
    ...[1, 2, 3].flatMap((row) =>
      [1, 2].map((tier) => ({ externalId: `b-${row}-${tier}`, kind: 'belt' as const, row, tier })),
    ),
    { externalId: 'col', kind: 'collector' as const, row: null, tier: null },
  ],
};

function readDay(model: RealisticHouseModel, day: string, minutes: number) {
  const from = productionDayStart(day, house.timezone, house.lightsOn);
  const to = productionDayStart(
    new Date(Date.parse(`${day}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10),
    house.timezone,
    house.lightsOn,
  );
  const sums = new Map<string, number>();
  for (let t = from.getTime(); t < to.getTime(); t += minutes * 60_000) {
    const end = Math.min(to.getTime(), t + minutes * 60_000);
    for (const r of model.readingsFor(new Date(t), new Date(end)))
      sums.set(r.counter, (sums.get(r.counter) ?? 0) + r.eggs);
  }
  return sums;
}

describe('RealisticHouseModel', () => {
  const start = new Date('2026-03-01T12:00:00Z');

  it("adds up a day's readings to the simulator's day counts exactly, read by minute or by 15 minutes", () => {
    const model = new RealisticHouseModel(house, { seed: 7, start });
    const day = model.day('2026-03-02');
    const byMinute = readDay(new RealisticHouseModel(house, { seed: 7, start }), '2026-03-02', 1);
    const byQuarter = readDay(new RealisticHouseModel(house, { seed: 7, start }), '2026-03-02', 15);
    for (const s of day.sections) {
      const counted = s.counted.reduce((a, b) => a + b, 0);
      expect(byMinute.get(`b-${s.row}-${s.tier}`)).toBe(counted);
      expect(byQuarter.get(`b-${s.row}-${s.tier}`)).toBe(counted);
    }
    // 2,000 hens a section at 40 weeks lay most days well over 1,400 eggs each (binomial, never above the hens).
    const eggs = [...byMinute.entries()].filter(([k]) => k !== 'col').map(([, v]) => v);
    for (const e of eggs) expect(e).toBeGreaterThan(1_400);
    for (const e of eggs) expect(e).toBeLessThanOrEqual(2_100);
  });

  it('loses no eggs and invents none on the 23-hour day the clocks go forward', () => {
    // 2026-03-08 is the day US clocks go forward (02:00 → 03:00): its production day has 23 hours.
    const model = new RealisticHouseModel(house, { seed: 8, start });
    const day = model.day('2026-03-08');
    const read = readDay(new RealisticHouseModel(house, { seed: 8, start }), '2026-03-08', 15);
    for (const s of day.sections)
      expect(read.get(`b-${s.row}-${s.tier}`)).toBe(s.counted.reduce((a, b) => a + b, 0));
  });

  it('plants a dead counter: it counts nothing after its onset, while its eggs still reach the collector', () => {
    const faults = [
      parseFault('silent:house=House 1,row=2,tier=1,from=2026-03-03T10:00:00Z', start),
    ];
    const model = new RealisticHouseModel(house, { seed: 9, start, faults });
    const after = readDay(model, '2026-03-04', 15);
    expect(after.get('b-2-1')).toBe(0);
    const belts = [...after.entries()].filter(([k]) => k !== 'col').reduce((n, [, v]) => n + v, 0);
    // The collector has the dead section's eggs too: about a sixth more than the belts counted.
    expect((after.get('col') ?? 0) / belts).toBeGreaterThan(1.1);
  });

  it('plants a feed-line fault on one row that shows over about a day', () => {
    const faults = [
      parseFault('feed:house=House 1,row=3,drop=0.2,from=2026-03-02T10:00:00Z', start),
    ];
    const clean = new RealisticHouseModel(house, { seed: 10, start });
    const faulty = new RealisticHouseModel(house, { seed: 10, start, faults });
    const ratio = (day: string) => {
      const a = readDay(faulty, day, 15);
      const b = readDay(clean, day, 15);
      return (
        ((a.get('b-3-1') ?? 0) + (a.get('b-3-2') ?? 0)) /
        ((b.get('b-3-1') ?? 0) + (b.get('b-3-2') ?? 0))
      );
    };
    expect(ratio('2026-03-01')).toBe(1);
    expect(ratio('2026-03-04')).toBeLessThan(0.85);
  });
});
