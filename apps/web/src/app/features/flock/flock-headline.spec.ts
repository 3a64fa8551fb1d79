import type { FlockProduction } from '@tierscope/contracts';
import { flockHeadline } from './flock-headline';

type Day = FlockProduction['days'][number];
const day = (n: number, over: Partial<Day> = {}): Day => ({
  day: `2026-11-${String(n).padStart(2, '0')}`,
  ageWeeks: 40,
  eggs: 900,
  collector: 900,
  hensAlive: 1000,
  dead: 0,
  culled: 0,
  henDayPct: 90,
  isWalkRecorded: true,
  ...over,
});

describe('flockHeadline', () => {
  it('puts the last complete day and the last 7 days first, the week as eggs over hen-days', () => {
    // Ten days: the first three laid 60 %, the last seven 90 % (one of them on fewer hens).
    const days = [
      ...[1, 2, 3].map((n) => day(n, { eggs: 600, henDayPct: 60 })),
      ...[4, 5, 6, 7, 8, 9].map((n) => day(n)),
      day(10, { eggs: 450, hensAlive: 500, henDayPct: 90 }),
    ];
    const headline = flockHeadline(days);
    expect(headline.yesterday).toEqual({ day: '2026-11-10', henDayPct: 90 });
    // (6 × 900 + 450) / (6 × 1000 + 500) = 5850 / 6500 = 90 %: the early 60 % days do not pull it down.
    expect(headline.lastWeekPct).toBe(90);
  });

  it('skips days without counts, and says which of the last 7 days have no morning walk', () => {
    const days = [
      day(1),
      day(2, { isWalkRecorded: false }),
      day(3, { eggs: null, henDayPct: null }),
      day(4, { isWalkRecorded: false }),
    ];
    const headline = flockHeadline(days);
    expect(headline.yesterday?.day).toBe('2026-11-04');
    expect(headline.daysWithoutWalk).toEqual(['2026-11-02', '2026-11-04']);
  });

  it('has nothing to say before the first counted day', () => {
    expect(flockHeadline([])).toEqual({ yesterday: null, lastWeekPct: null, daysWithoutWalk: [] });
  });
});
