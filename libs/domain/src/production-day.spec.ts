import { describe, expect, it } from 'vitest';
import { minutesSinceLightsOn, productionDayOf } from './production-day';

describe('productionDayOf', () => {
  it('counts the hours before lights-on toward the previous day', () => {
    // 09:30 UTC on 25 Nov 2026 is 03:30 in Chicago (CST, UTC−6): before the 04:00 lights-on.
    expect(productionDayOf(new Date('2026-11-25T09:30:00Z'), 'America/Chicago', '04:00')).toBe(
      '2026-11-24',
    );
    expect(productionDayOf(new Date('2026-11-25T10:30:00Z'), 'America/Chicago', '04:00')).toBe(
      '2026-11-25',
    );
  });

  it('follows daylight-saving time: lights-on stays at 04:00 local across the change', () => {
    // US DST began 2026-03-08 at 02:00 local. 04:00 CDT on 8 March is 09:00 UTC; on 7 March 04:00 CST is 10:00 UTC.
    expect(productionDayOf(new Date('2026-03-08T09:05:00Z'), 'America/Chicago', '04:00')).toBe(
      '2026-03-08',
    );
    expect(productionDayOf(new Date('2026-03-07T09:55:00Z'), 'America/Chicago', '04:00')).toBe(
      '2026-03-06',
    );
  });
});

describe('minutesSinceLightsOn', () => {
  it('measures from the house clock, not UTC', () => {
    // 12:00 UTC is 13:00 in Amsterdam in winter (CET): 9.5 h after a 03:30 lights-on.
    expect(
      minutesSinceLightsOn(new Date('2026-01-15T12:00:00Z'), 'Europe/Amsterdam', '03:30'),
    ).toBe(570);
  });

  it('wraps to the previous lights-on during the night', () => {
    expect(minutesSinceLightsOn(new Date('2026-11-25T09:30:00Z'), 'America/Chicago', '04:00')).toBe(
      1410,
    );
  });

  it('counts real time across a daylight-saving change, not the wall clock', () => {
    // America/Chicago springs forward at 02:00 on Sunday 8 March 2026 (US Energy Policy Act of 2005 rules:
    // second Sunday of March). Lights on at 22:00 on the 7th (CST, 04:00 UTC on the 8th); at 05:00 CDT on the
    // 8th (10:00 UTC) 6 hours have passed, though the wall clock says 7.
    expect(minutesSinceLightsOn(new Date('2026-03-08T10:00:00Z'), 'America/Chicago', '22:00')).toBe(
      360,
    );
    // Europe/Amsterdam falls back at 03:00 on 25 October 2026 (EU rule: last Sunday of October). Lights on at
    // 00:30 CEST (22:30 UTC on the 24th); at 04:30 CET (03:30 UTC) 5 hours have passed, not 4.
    expect(
      minutesSinceLightsOn(new Date('2026-10-25T03:30:00Z'), 'Europe/Amsterdam', '00:30'),
    ).toBe(300);
  });
});
