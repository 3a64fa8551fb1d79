/** "HH:MM" on a 24-hour clock, as houses state their lights-on time. */
export const CLOCK_TIME_PATTERN = /^([01]\d|2[0-3]):[0-5]\d$/;

/** Minutes after midnight of a valid "HH:MM", or null when it is not one. */
export function minutesOfDay(clock: string): number | null {
  if (!CLOCK_TIME_PATTERN.test(clock)) return null;
  const [hours, minutes] = clock.split(':').map(Number) as [number, number];
  return hours * 60 + minutes;
}

/** True for an IANA time-zone name this runtime knows (e.g. "America/Chicago"). */
export function isKnownTimeZone(zone: string): boolean {
  if (zone.trim() === '') return false;
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: zone });
    return true;
  } catch {
    // Intl throws a RangeError for an unknown zone: that is the answer, not a failure.
    return false;
  }
}
