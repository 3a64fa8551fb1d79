import type { FlockProduction } from '@tierscope/contracts';

/** The flock page's first figures: how the flock lays now, before its whole-life average. */
export interface FlockHeadline {
  /** the last complete day's hen-day % and that day; null before any counted day */
  yesterday: { day: string; henDayPct: number } | null;
  /** hen-day % over the last 7 complete days with counts (eggs over hen-days, not a mean of %) */
  lastWeekPct: number | null;
  /** complete days of the last 7 with no morning walk recorded (dead and culled unknown) */
  daysWithoutWalk: string[];
}

const WEEK = 7;

export function flockHeadline(days: FlockProduction['days']): FlockHeadline {
  const counted = days.filter((d) => d.eggs !== null && d.hensAlive > 0);
  const last = counted.at(-1);
  const week = counted.slice(-WEEK);
  const henDays = week.reduce((sum, d) => sum + d.hensAlive, 0);
  const eggs = week.reduce((sum, d) => sum + (d.eggs ?? 0), 0);
  return {
    yesterday:
      last && last.henDayPct !== null ? { day: last.day, henDayPct: last.henDayPct } : null,
    lastWeekPct: henDays > 0 ? Math.round((1000 * eggs) / henDays) / 10 : null,
    daysWithoutWalk: days
      .slice(-WEEK)
      .filter((d) => !d.isWalkRecorded)
      .map((d) => d.day),
  };
}
