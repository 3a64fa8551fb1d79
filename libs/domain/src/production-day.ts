import { minutesOfDay } from './clock';

/** One formatter per zone: making an Intl.DateTimeFormat costs far more than using one. */
const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let formatter = formatters.get(timeZone);
  if (!formatter) {
    formatter = new Intl.DateTimeFormat('en-CA', {
      timeZone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hourCycle: 'h23',
    });
    formatters.set(timeZone, formatter);
  }
  return formatter;
}

/** Wall-clock parts of an instant in an IANA zone. */
export function localParts(instant: Date, timeZone: string) {
  const parts = formatterFor(timeZone).formatToParts(instant);
  const get = (type: Intl.DateTimeFormatPartTypes) =>
    Number(parts.find((p) => p.type === type)?.value);
  return {
    year: get('year'),
    month: get('month'),
    day: get('day'),
    hour: get('hour'),
    minute: get('minute'),
    second: get('second'),
  };
}

/**
 * Minutes since the most recent lights-on, by the house's own wall clock (0 … 1439). A production day starts
 * at lights-on in the house's time zone, so this is also how far into its production day an instant is.
 */
export function minutesSinceLightsOn(instant: Date, timeZone: string, lightsOn: string): number {
  // Real elapsed time since the lights-on that began this production day, not a wall-clock difference: on a
  // daylight-saving day the wall clock jumps an hour and a production day lasts 23 or 25 hours.
  const day = productionDayOf(instant, timeZone, lightsOn);
  return (instant.getTime() - productionDayStart(day, timeZone, lightsOn).getTime()) / 60_000;
}

/**
 * The production day (local calendar date, YYYY-MM-DD) an instant belongs to: the date of the lights-on that
 * began it. The same rule as the database rollups: ((ts AT TIME ZONE zone) − lights_on)::date.
 */
export function productionDayOf(instant: Date, timeZone: string, lightsOn: string): string {
  const start = minutesOfDay(lightsOn);
  if (start === null) throw new RangeError(`lights-on "${lightsOn}" is not HH:MM`);
  const local = localParts(instant, timeZone);
  const wall = Date.UTC(
    local.year,
    local.month - 1,
    local.day,
    local.hour,
    local.minute,
    local.second,
  );
  return new Date(wall - start * 60_000).toISOString().slice(0, 10);
}

/** The instant a house's production day `day` (YYYY-MM-DD) starts: lights-on that local date. */
export function productionDayStart(day: string, timeZone: string, lightsOn: string): Date {
  // A pure function of its three inputs, asked for the same days over and over by every replayed
  // checkpoint (three time-zone conversions each): remembered, a bounded number of them.
  const key = `${day}|${timeZone}|${lightsOn}`;
  const known = dayStarts.get(key);
  if (known !== undefined) return new Date(known);
  const start = computeProductionDayStart(day, timeZone, lightsOn);
  if (dayStarts.size >= MAX_REMEMBERED_DAY_STARTS) dayStarts.clear();
  dayStarts.set(key, start.getTime());
  return start;
}

const MAX_REMEMBERED_DAY_STARTS = 20_000;
const dayStarts = new Map<string, number>();

function computeProductionDayStart(day: string, timeZone: string, lightsOn: string): Date {
  const minutes = minutesOfDay(lightsOn);
  if (minutes === null) throw new RangeError(`lights-on "${lightsOn}" is not HH:MM`);
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  const wall = Date.UTC(y, m - 1, d, 0, minutes);
  // Find the instant whose wall clock in the zone reads `wall`: two passes settle any offset (DST included).
  let guess = wall;
  for (let i = 0; i < 3; i++) {
    const p = localParts(new Date(guess), timeZone);
    const shown = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
    guess += wall - shown;
  }
  return new Date(guess);
}
