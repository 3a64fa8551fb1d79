import { productionDayOf, productionDayStart } from './production-day';

export function addDays(day: string, days: number): string {
  const date = new Date(`${day}T00:00:00Z`);
  date.setUTCDate(date.getUTCDate() + days);
  return date.toISOString().slice(0, 10);
}

export const WINDOW_KINDS = ['today', 'yesterday', '7d', 'custom'] as const;
export type WindowKind = (typeof WINDOW_KINDS)[number];

export interface ProductionWindow {
  kind: WindowKind;
  /** first and last production day (inclusive) */
  firstDay: string;
  lastDay: string;
  from: Date;
  to: Date;
  /** false while the window's last day is still running */
  isComplete: boolean;
}

/**
 * The windows used everywhere: today so far, yesterday (the last complete production day), the last 7
 * complete days, or a custom range of days — all by the house's own lights-on and time zone.
 */
export function productionWindow(
  kind: WindowKind,
  now: Date,
  house: { timezone: string; lightsOn: string },
  custom?: { firstDay: string; lastDay: string },
): ProductionWindow {
  const today = productionDayOf(now, house.timezone, house.lightsOn);
  const start = (day: string) => productionDayStart(day, house.timezone, house.lightsOn);
  const make = (firstDay: string, lastDay: string, isToday: boolean): ProductionWindow => ({
    kind,
    firstDay,
    lastDay,
    from: start(firstDay),
    to: isToday ? now : start(addDays(lastDay, 1)),
    isComplete: !isToday,
  });
  switch (kind) {
    case 'today':
      return make(today, today, true);
    case 'yesterday':
      return make(addDays(today, -1), addDays(today, -1), false);
    case '7d':
      return make(addDays(today, -7), addDays(today, -1), false);
    case 'custom': {
      if (!custom || custom.firstDay > custom.lastDay)
        throw new RangeError('a custom window needs first ≤ last day');
      const lastDay = custom.lastDay >= today ? today : custom.lastDay;
      return make(custom.firstDay, lastDay, lastDay === today);
    }
  }
}

/** Every production day of a window, in order. */
export function daysOf(window: Pick<ProductionWindow, 'firstDay' | 'lastDay'>): string[] {
  const days: string[] = [];
  for (let day = window.firstDay; day <= window.lastDay; day = addDays(day, 1)) days.push(day);
  return days;
}
