import { describe, expect, it } from 'vitest';
import { monthStart } from './retention';

describe('monthStart', () => {
  it('steps across year ends in UTC', () => {
    const now = new Date('2026-12-01T03:00:00Z');
    expect(monthStart(now, 0)).toBe('2026-12-01');
    expect(monthStart(now, 1)).toBe('2027-01-01');
    expect(monthStart(now, -25)).toBe('2024-11-01');
  });
});
