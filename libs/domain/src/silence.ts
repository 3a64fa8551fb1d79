/** A silent counter's cell, as a person reads it: since when it counted nothing, and what that has missed. */
export interface SilenceSummary {
  /** its last counted egg (or, when none is on record, when the exception opened) */
  since: string;
  /** eggs its tier's other sections have each counted so far today (their median); null before any count */
  usualByNow: number | null;
  /** eggs it did not count since it went silent: they reached the collector, not its belt count */
  notCounted: number;
}

/**
 * What a dead counter has missed, from the section's own figures: each complete day since it went silent
 * adds what that day expected of it beyond what it counted, and today adds its peers' median so far beyond
 * its own. `days` are complete production days (oldest first), `today` the cumulative hours of today.
 */
export function silenceOf(input: {
  since: Date;
  sinceDay: string;
  days: readonly { day: string; eggs: number | null; expected: number | null }[];
  today: readonly { eggs: number; peers: number | null }[];
}): SilenceSummary {
  const latest = input.today.at(-1);
  const usualByNow = latest?.peers ?? null;
  let notCounted = 0;
  for (const d of input.days) {
    if (d.day < input.sinceDay || d.expected === null) continue;
    notCounted += Math.max(0, d.expected - (d.eggs ?? 0));
  }
  if (usualByNow !== null) notCounted += Math.max(0, usualByNow - (latest?.eggs ?? 0));
  return { since: input.since.toISOString(), usualByNow, notCounted: Math.round(notCounted) };
}

/** How long, in words a person reads at a glance: "40 min", "5 h 10 min", "1 day 3 h". */
export function durationWords(fromIso: string, to: Date): string {
  const minutes = Math.max(0, Math.floor((to.getTime() - new Date(fromIso).getTime()) / 60_000));
  const days = Math.floor(minutes / 1440);
  const hours = Math.floor((minutes % 1440) / 60);
  if (days > 0) return `${days} ${days === 1 ? 'day' : 'days'}${hours > 0 ? ` ${hours} h` : ''}`;
  if (hours > 0) return `${hours} h${minutes % 60 > 0 ? ` ${minutes % 60} min` : ''}`;
  return `${minutes} min`;
}
