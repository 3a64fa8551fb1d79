import { describe, expect, it } from 'vitest';
import { parseFault, parseWhen } from './faults';

const start = new Date('2026-12-01T12:00:00Z');

describe('parseFault', () => {
  it('reads a feed-line fault with a relative start', () => {
    expect(parseFault('feed:house=House 1,row=3,drop=0.15,from=+2h', start)).toEqual({
      kind: 'feed',
      house: 'House 1',
      row: 3,
      drop: 0.15,
      from: new Date('2026-12-01T14:00:00Z'),
    });
  });

  it('reads a water decline given per hour', () => {
    expect(parseFault('water:house=H,tier=2,decline=0.02/h', start)).toMatchObject({
      kind: 'water',
      tier: 2,
      declinePerHour: 0.02,
      from: start,
    });
  });

  it('says what is missing or wrong', () => {
    expect(() => parseFault('feed:house=H,drop=0.1', start)).toThrow(/row= is missing/);
    expect(() => parseFault('flood:house=H', start)).toThrow(/unknown kind/);
    expect(() => parseWhen('soon', start)).toThrow(/not a time/);
  });

  it('takes days back and ISO times', () => {
    expect(parseWhen('-3d', start)).toEqual(new Date('2026-11-28T12:00:00Z'));
    expect(parseWhen('2026-12-02T00:00:00Z', start)).toEqual(new Date('2026-12-02T00:00:00Z'));
  });
});
