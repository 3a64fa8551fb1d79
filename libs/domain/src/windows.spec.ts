import { describe, expect, it } from 'vitest';
import { addDays, daysOf, productionWindow } from './windows';
import { productionDayStart } from './production-day';

const chicago = { timezone: 'America/Chicago', lightsOn: '04:00' };
const hours = (a: Date, b: Date) => (b.getTime() - a.getTime()) / 3_600_000;

describe('production days across daylight-saving changes (real IANA zones)', () => {
  it('is 23 hours long on the day the clocks go forward', () => {
    // US DST starts 2026-03-08 02:00 local: the day that began 04:00 CST on the 7th ends 04:00 CDT on the 8th.
    const start = productionDayStart('2026-03-07', chicago.timezone, chicago.lightsOn);
    const next = productionDayStart('2026-03-08', chicago.timezone, chicago.lightsOn);
    expect(start.toISOString()).toBe('2026-03-07T10:00:00.000Z');
    expect(next.toISOString()).toBe('2026-03-08T09:00:00.000Z');
    expect(hours(start, next)).toBe(23);
  });

  it('is 25 hours long on the day the clocks go back', () => {
    // US DST ends 2026-11-01 02:00 local.
    const start = productionDayStart('2026-10-31', chicago.timezone, chicago.lightsOn);
    const next = productionDayStart('2026-11-01', chicago.timezone, chicago.lightsOn);
    expect(hours(start, next)).toBe(25);
  });

  it('handles a European zone and a lights-on at half past', () => {
    // EU summer time starts 2026-03-29 01:00 UTC.
    const start = productionDayStart('2026-03-28', 'Europe/Amsterdam', '03:30');
    const next = productionDayStart('2026-03-29', 'Europe/Amsterdam', '03:30');
    expect(start.toISOString()).toBe('2026-03-28T02:30:00.000Z');
    expect(hours(start, next)).toBe(23);
  });
});

describe('productionWindow', () => {
  // 2026-11-25 15:00 UTC = 09:00 in Chicago: five hours into the 25th.
  const now = new Date('2026-11-25T15:00:00Z');

  it('today runs from this morning’s lights-on to now', () => {
    const w = productionWindow('today', now, chicago);
    expect([w.firstDay, w.from.toISOString(), w.to, w.isComplete]).toEqual([
      '2026-11-25',
      '2026-11-25T10:00:00.000Z',
      now,
      false,
    ]);
  });

  it('yesterday is the last complete day and 7d the seven before today', () => {
    const y = productionWindow('yesterday', now, chicago);
    expect([y.firstDay, y.lastDay, y.to.toISOString()]).toEqual([
      '2026-11-24',
      '2026-11-24',
      '2026-11-25T10:00:00.000Z',
    ]);
    const week = productionWindow('7d', now, chicago);
    expect(daysOf(week)).toHaveLength(7);
    expect(week.lastDay).toBe('2026-11-24');
  });

  it('before lights-on, today is still the previous production day', () => {
    const early = new Date('2026-11-25T09:30:00Z'); // 03:30 local
    expect(productionWindow('today', early, chicago).firstDay).toBe('2026-11-24');
  });

  it('a custom range ending in the future ends now', () => {
    const w = productionWindow('custom', now, chicago, {
      firstDay: '2026-11-01',
      lastDay: '2026-12-31',
    });
    expect([w.lastDay, w.isComplete]).toEqual(['2026-11-25', false]);
    expect(() =>
      productionWindow('custom', now, chicago, { firstDay: '2026-11-05', lastDay: '2026-11-01' }),
    ).toThrow();
  });

  it('steps days across month ends', () => {
    expect(addDays('2026-02-28', 1)).toBe('2026-03-01');
  });
});
