import { poissonDistribution } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  RealisticHouse,
  SLOT_MINUTES,
  SLOTS_PER_DAY,
  type PlantedFault,
} from '../../../simulator/src/realistic';
import type { PastDay } from './house-judgement';
import {
  dayHourRatios,
  judgeSilence,
  byGridHour,
  LAY_GRID_HOURS,
  SILENT_MIN_EXPECTED,
  SlotSilenceWatch,
  usualHourRatios,
  usualRatioAt,
} from './silent-counter';

describe('judgeSilence', () => {
  it('needs 30 quiet minutes in which its peers say at least 14 eggs were due', () => {
    const peersEggs = [20, 22, 18];
    expect(judgeSilence({ quietMinutes: 30, peersEggs, baselineLogRatio: 0 })).toEqual({
      due: 20,
      isSilent: true,
    });
    expect(judgeSilence({ quietMinutes: 15, peersEggs, baselineLogRatio: 0 }).isSilent).toBe(false);
    // Peers that counted nothing (belts not running, dark, data not in) make nothing due.
    expect(judgeSilence({ quietMinutes: 240, peersEggs: [0, 0, 0], baselineLogRatio: 0 })).toEqual({
      due: 0,
      isSilent: false,
    });
    // The section's usual ratio to its peers scales what is due: one that lays 70 % of its peers' eggs.
    expect(
      judgeSilence({ quietMinutes: 30, peersEggs: [18, 18], baselineLogRatio: Math.log(0.7) })
        .isSilent,
    ).toBe(false);
    // The median: one busy peer does not make a quiet hour look busy.
    expect(judgeSilence({ quietMinutes: 60, peersEggs: [2, 3, 90], baselineLogRatio: 0 }).due).toBe(
      3,
    );
  });

  it('14 eggs due is where zero stops being chance (Poisson, checked with simple-statistics)', () => {
    // simple-statistics' poissonDistribution(λ)[0] is P(X = 0) for a Poisson count with mean λ: e^-λ.
    expect(poissonDistribution(SILENT_MIN_EXPECTED)?.[0] ?? 1).toBeLessThan(1e-6);
    expect(poissonDistribution(SILENT_MIN_EXPECTED - 1)?.[0] ?? 0).toBeGreaterThan(1e-6);
  });

  it('in the first hours, caps what is due by the section’s usual count by this hour', () => {
    // Its peers counted 60 since it last did, but it usually has a tenth of their eggs by this hour.
    const late = judgeSilence({
      quietMinutes: 120,
      peersEggs: [60, 60, 60],
      baselineLogRatio: 0,
      today: { peers: [60, 60, 60], own: 0, usualRatio: 0.1, peersDay: null },
    });
    expect(late).toEqual({ due: 6, isSilent: false });
    // A section that usually keeps up with its peers is silent at once.
    const dead = judgeSilence({
      quietMinutes: 120,
      peersEggs: [60, 60, 60],
      baselineLogRatio: 0,
      today: { peers: [60, 60, 60], own: 0, usualRatio: 1, peersDay: null },
    });
    expect(dead).toEqual({ due: 60, isSilent: true });
    // What it already counted today is subtracted; a usual ratio not learned yet caps nothing.
    expect(
      judgeSilence({
        quietMinutes: 45,
        peersEggs: [30],
        baselineLogRatio: 0,
        today: { peers: [100], own: 95, usualRatio: 1, peersDay: null },
      }).due,
    ).toBe(5);
    expect(
      judgeSilence({
        quietMinutes: 45,
        peersEggs: [30],
        baselineLogRatio: 0,
        today: { peers: [100], own: 0, usualRatio: null, peersDay: null },
      }).due,
    ).toBe(30);
  });

  it('calls nothing silent while its peers are on their first 5 % of a day', () => {
    const input = (peersToday: number) => ({
      quietMinutes: 60,
      peersEggs: [peersToday],
      baselineLogRatio: 0,
      today: { peers: [peersToday], own: 0, usualRatio: 1, peersDay: 800 },
    });
    expect(judgeSilence(input(39))).toEqual({ due: 0, isSilent: false });
    expect(judgeSilence(input(40))).toEqual({ due: 40, isSilent: true });
  });

  it('takes the usual ratio at a time of day from the smaller of the grid hours either side', () => {
    const usual = [null, 0.1, 0.4, 0.8, 0.95, 1];
    expect(usualRatioAt(usual, 0.5)).toBeNull();
    expect(usualRatioAt(usual, 1.75)).toBe(0.1);
    expect(usualRatioAt(usual, 2)).toBe(0.1);
    expect(usualRatioAt(usual, 2.25)).toBe(0.1);
    expect(usualRatioAt(usual, 3.5)).toBe(0.4);
    expect(usualRatioAt(usual, 6.25)).toBeNull();
  });
});

describe('byGridHour', () => {
  it('sums 15-minute slots from lights-on into eggs by each grid hour, as hourly rollups hold them', () => {
    const slots = Array.from({ length: 32 }, (_, k) => (k < 4 ? 1 : 2));
    expect(byGridHour(slots, 15)).toEqual([4, 12, 20, 28, 36, 44]);
    // A day cut short counts what there is.
    expect(byGridHour([5, 5], 15)).toEqual([10, 10, 10, 10, 10, 10]);
  });
});

describe('usualHourRatios', () => {
  const day = (ratio: number | null, excluded: string[] = []): PastDay => ({
    day: 'd',
    logRatios: [],
    excluded: new Set(excluded),
    hourRatios: new Map([['section:1:1', LAY_GRID_HOURS.map(() => ratio)]]),
  });

  it('is the median of the clean days, null while fewer than three', () => {
    expect(usualHourRatios([day(0.2), day(0.3)], 'section:1:1')[0]).toBeNull();
    expect(usualHourRatios([day(0.2), day(0.3), day(0.9)], 'section:1:1')[0]).toBe(0.3);
    // A day with an exception on the section is not learned from.
    expect(
      usualHourRatios([day(0.2), day(0.3), day(0.25), day(0, ['section:1:1'])], 'section:1:1')[2],
    ).toBe(0.25);
  });
});

/**
 * The silent check slot by slot (SlotSilenceWatch, as bench:detect runs it) over realistic simulated houses
 * (binomial counts, day-to-day noise, each section's own laying-time offset). Returns the slots at which each
 * section was first called silent.
 */
function silentAlarms(
  house: RealisticHouse,
  days: number,
  from: number,
): { key: string; slot: number }[] {
  const watch = new SlotSilenceWatch(house.dayData(0).sections, days * SLOTS_PER_DAY, {
    minutes: SLOT_MINUTES,
    perDay: SLOTS_PER_DAY,
    light: (house.photoperiodHours * 60) / SLOT_MINUTES,
  });
  const past: PastDay[] = [];
  const alarms: { key: string; slot: number }[] = [];
  const open = new Set<string>();
  for (let d = 0; d < days; d++) {
    const day = house.dayData(d);
    const usual = new Map(watch.keys.map((key) => [key, usualHourRatios(past, key)]));
    for (let k = 0; k < SLOTS_PER_DAY; k++) {
      const at = d * SLOTS_PER_DAY + k;
      const results = watch.step(
        at,
        day.sections.map((s) => s.counted[k] ?? 0),
        { baselineLogRatio: () => 0, usualRatios: (key) => usual.get(key) ?? [] },
      );
      for (const { key, counted, verdict } of results) {
        if (counted) open.delete(key);
        if (verdict?.isSilent && !open.has(key)) {
          open.add(key);
          if (at >= from) alarms.push({ key, slot: at + 1 });
        }
      }
    }
    const ratios = dayHourRatios(
      day.sections.map((s) => ({
        row: s.row,
        tier: s.tier,
        byHour: byGridHour(s.counted, SLOT_MINUTES),
      })),
    );
    past.unshift({ day: `d${d}`, logRatios: [], excluded: new Set(), hourRatios: ratios });
  }
  return alarms;
}

describe('the silent check on realistic houses', () => {
  const lateSection: PlantedFault = { kind: 'late-section', row: 2, tier: 2, minutes: 45 };

  // Regression (issue 11): a blanket two-hour grace after lights-on hid a counter that died overnight until
  // well into the laying; without it, a section that always lays late was called silent every morning,
  // and on belts run at set times its empty first run looked like a dead counter.
  it('never calls a section that always lays 45 min late silent, on running or scheduled belts', () => {
    for (const beltRunHours of [undefined, [1.5, 3, 4.5, 6, 8, 10, 13, 16]]) {
      for (const breed of ['white', 'brown'] as const) {
        const house = new RealisticHouse({
          rows: 6,
          tiers: 3,
          seed: 11,
          breed,
          beltRunHours,
          faults: [lateSection],
        });
        expect(silentAlarms(house, 24, 4 * SLOTS_PER_DAY)).toEqual([]);
      }
    }
  });

  it('finds a counter that died overnight within its first hour of laying', () => {
    const onsetSlot = 20 * SLOTS_PER_DAY - 20; // the evening before day 20
    const house = new RealisticHouse({
      rows: 6,
      tiers: 3,
      seed: 12,
      breed: 'white',
      faults: [lateSection, { kind: 'dead', row: 4, tier: 1, onsetSlot }],
    });
    const alarms = silentAlarms(house, 21, 4 * SLOTS_PER_DAY);
    expect(alarms.map((a) => a.key)).toEqual(['section:4:1']);
    // The first slot of day 20 in which the dead section's hens laid 5 % of their day's eggs.
    const laid = Array.from(
      house.dayData(20).sections.find((s) => s.row === 4 && s.tier === 1)?.laid ?? [],
    );
    const total = laid.reduce((a, b) => a + b, 0);
    let sum = 0;
    let fivePercent = 0;
    while ((sum += laid[fivePercent] ?? 0) < 0.05 * total) fivePercent++;
    const alarmSlot = (alarms[0]?.slot ?? 0) - 20 * SLOTS_PER_DAY;
    expect(alarmSlot - fivePercent).toBeLessThanOrEqual(3);
  });
});
