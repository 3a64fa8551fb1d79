import { describe, expect, it } from 'vitest';
import { isKnownTimeZone, minutesOfDay } from './clock';

describe('minutesOfDay', () => {
  it('reads a 24-hour clock time', () => {
    expect(minutesOfDay('04:00')).toBe(240);
    expect(minutesOfDay('23:59')).toBe(1439);
    expect(minutesOfDay('00:00')).toBe(0);
  });

  it('rejects times that are not HH:MM', () => {
    for (const bad of ['4:00', '24:00', '12:60', '12:5', 'noon', '']) {
      expect(minutesOfDay(bad)).toBeNull();
    }
  });
});

describe('isKnownTimeZone', () => {
  it('knows IANA zones', () => {
    expect(isKnownTimeZone('America/Chicago')).toBe(true);
    expect(isKnownTimeZone('Europe/Amsterdam')).toBe(true);
    expect(isKnownTimeZone('UTC')).toBe(true);
  });

  it('rejects names that are not zones', () => {
    expect(isKnownTimeZone('Mars/Olympus_Mons')).toBe(false);
    expect(isKnownTimeZone('')).toBe(false);
  });
});
