import { describe, expect, it } from 'vitest';
import {
  detectDecimalMark,
  detectDelimiter,
  parseCount,
  parseTimestamp,
  wallTimeToInstant,
} from './csv-import';

describe('detectDelimiter', () => {
  it('finds comma, semicolon and tab', () => {
    expect(
      detectDelimiter('ts,row,tier,eggs\n2026-01-01T00:00Z,1,1,5\n2026-01-01T01:00Z,1,1,6\n'),
    ).toBe(',');
    expect(
      detectDelimiter('ts;row;tier;eggs\n01.01.2026 00:00;1;1;5,0\n01.01.2026 01:00;1;1;6\n'),
    ).toBe(';');
    expect(detectDelimiter('ts\trow\ttier\teggs\nx\t1\t1\t5\n')).toBe('\t');
  });

  it('ignores delimiters inside quoted fields and a leading byte-order mark', () => {
    expect(detectDelimiter('\uFEFF"a;b";c;d\n"x;y";1;2\n"z";3;4\n')).toBe(';');
    expect(detectDelimiter('"note, with comma"\tb\n"more, commas, here"\tc\n')).toBe('\t');
  });
});

describe('detectDecimalMark', () => {
  it('reads "12,0" cells in a semicolon file as a decimal comma', () => {
    expect(detectDecimalMark(['12,0', '7,0'], ';')).toBe(',');
    expect(detectDecimalMark(['12', '7'], ';')).toBe('.');
    expect(detectDecimalMark(['12,0'], ',')).toBe('.');
  });
});

describe('parseCount', () => {
  it('takes whole numbers, with thousands separators and zero fractions', () => {
    expect(parseCount(' 1234 ', '.')).toEqual({ ok: true, value: 1234 });
    expect(parseCount('1,234', '.')).toEqual({ ok: true, value: 1234 });
    expect(parseCount('1.234', ',')).toEqual({ ok: true, value: 1234 });
    expect(parseCount('12,0', ',')).toEqual({ ok: true, value: 12 });
    expect(parseCount('0', '.')).toEqual({ ok: true, value: 0 });
  });

  it('says what is wrong with anything else', () => {
    expect(parseCount('', '.')).toEqual({ ok: false, message: 'is empty' });
    expect(parseCount('12.5', '.')).toEqual({
      ok: false,
      message: '12.5 is not a whole number of eggs',
    });
    expect(parseCount('-3', '.')).toEqual({ ok: false, message: '-3 is negative' });
    expect(parseCount('ten', '.')).toEqual({ ok: false, message: '"ten" is not a number' });
  });
});

describe('parseTimestamp', () => {
  const at = (r: ReturnType<typeof parseTimestamp>) => (r.ok ? r.value.toISOString() : r.message);

  it('reads ISO-8601 with an offset exactly, whatever the zone given', () => {
    expect(at(parseTimestamp('2026-03-08T04:15:00-06:00', 'iso', 'Europe/Amsterdam'))).toBe(
      '2026-03-08T10:15:00.000Z',
    );
    expect(at(parseTimestamp('2026-03-08 04:15Z', 'iso', 'America/Chicago'))).toBe(
      '2026-03-08T04:15:00.000Z',
    );
  });

  it('reads times without an offset on the house clock, in each date order', () => {
    // America/Chicago is UTC−6 in January (CST) and UTC−5 in July (CDT), per the IANA tz database.
    expect(at(parseTimestamp('2026-01-15T04:00', 'iso', 'America/Chicago'))).toBe(
      '2026-01-15T10:00:00.000Z',
    );
    expect(at(parseTimestamp('15/07/2026 04:00', 'dmy', 'America/Chicago'))).toBe(
      '2026-07-15T09:00:00.000Z',
    );
    expect(at(parseTimestamp('07/15/2026 04:00:30', 'mdy', 'America/Chicago'))).toBe(
      '2026-07-15T09:00:30.000Z',
    );
    expect(at(parseTimestamp('2026.07.15 4:00', 'ymd', 'America/Chicago'))).toBe(
      '2026-07-15T09:00:00.000Z',
    );
  });

  it('refuses impossible dates and the wrong order', () => {
    expect(parseTimestamp('31/02/2026 04:00', 'dmy', 'UTC').ok).toBe(false);
    expect(parseTimestamp('13/31/2026 04:00', 'mdy', 'UTC').ok).toBe(false);
    expect(parseTimestamp('2026-01-01', 'iso', 'UTC')).toEqual({
      ok: false,
      message: '"2026-01-01" is not an ISO-8601 time (2026-03-08T04:15:00-06:00)',
    });
  });
});

describe('wallTimeToInstant across daylight-saving changes', () => {
  // US clocks went forward at 02:00 on 8 March 2026 and back at 02:00 on 1 November 2026 (Energy Policy
  // Act of 2005: second Sunday of March, first Sunday of November).
  const wall = (day: number, month: number, hour: number, minute = 0) => ({
    year: 2026,
    month,
    day,
    hour,
    minute,
    second: 0,
  });
  it('takes the first of the two 01:30s when clocks go back', () => {
    expect(wallTimeToInstant(wall(1, 11, 1, 30), 'America/Chicago').toISOString()).toBe(
      '2026-11-01T06:30:00.000Z',
    );
  });
  it('reads the skipped 02:30 with the offset from before the change', () => {
    expect(wallTimeToInstant(wall(8, 3, 2, 30), 'America/Chicago').toISOString()).toBe(
      '2026-03-08T08:30:00.000Z',
    );
  });
  it('is plain on ordinary days', () => {
    expect(wallTimeToInstant(wall(8, 3, 4, 0), 'America/Chicago').toISOString()).toBe(
      '2026-03-08T09:00:00.000Z',
    );
    expect(wallTimeToInstant(wall(29, 3, 2, 30), 'Europe/Amsterdam').toISOString()).toBe(
      '2026-03-29T01:30:00.000Z',
    );
  });
});
