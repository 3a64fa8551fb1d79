import { describe, expect, it } from 'vitest';
import { durationWords, silenceOf } from './silence';

const days = [
  { day: '2026-11-29', eggs: 1200, expected: 1190 },
  { day: '2026-11-30', eggs: 1210, expected: 1205 },
  // went silent at 10:00 on Dec 1: it counted the morning only
  { day: '2026-12-01', eggs: 700, expected: 1247 },
];

describe('silenceOf (what a dead counter has missed)', () => {
  it('adds each silent day beyond what it counted, and today its peers so far beyond its own', () => {
    const summary = silenceOf({
      since: new Date('2026-12-01T16:00:00Z'),
      sinceDay: '2026-12-01',
      days,
      today: [
        { eggs: 0, peers: 300 },
        { eggs: 0, peers: 820 },
      ],
    });
    // Dec 1: 1247 − 700 = 547; today: 820 − 0 = 820. Days before the silence add nothing.
    expect(summary).toEqual({
      since: '2026-12-01T16:00:00.000Z',
      usualByNow: 820,
      notCounted: 547 + 820,
    });
  });

  it('says nothing of today before any section has counted, and never counts a day it beat', () => {
    const summary = silenceOf({
      since: new Date('2026-11-30T12:00:00Z'),
      sinceDay: '2026-11-30',
      days,
      today: [],
    });
    // Nov 30 counted more than expected: it adds 0, not −5.
    expect(summary.usualByNow).toBeNull();
    expect(summary.notCounted).toBe(547);
  });
});

describe('durationWords', () => {
  const now = new Date('2026-12-02T12:00:00Z');
  it('reads in minutes, hours or days', () => {
    expect(durationWords('2026-12-02T11:20:00Z', now)).toBe('40 min');
    expect(durationWords('2026-12-02T06:50:00Z', now)).toBe('5 h 10 min');
    expect(durationWords('2026-12-01T09:00:00Z', now)).toBe('1 day 3 h');
    expect(durationWords('2026-11-29T12:00:00Z', now)).toBe('3 days');
  });
});
