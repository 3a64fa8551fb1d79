import { MIN_CLEAN_DAYS, NORM_DAYS, spotKeyOf } from './detection';
import type { PastDay } from './house-judgement';
import { median } from './statistics';

/**
 * A silent belt counter: it has counted nothing for at least 30 minutes, and its tier peers counted so many
 * eggs since its last one that zero cannot be chance (Poisson P(0 | 14) ≈ 8·10⁻⁷). Peers that counted nothing
 * (belts not running, dark, data not in) make nothing due.
 *
 * Sections do not start laying at one moment: some lay a quarter or half an hour behind their peers every
 * day, and on belts that run at set times their first eggs come a run later. So nothing is due while the
 * peers are still on their first 5 % of a day (FIRST_EGGS_SHARE), and in the first hours of light what is due
 * is also capped by the section's own usual count by that hour against its peers', learned from its past
 * days' hourly counts: a section that always starts late is never called silent for it, and a dead counter
 * is found as soon as its peers' eggs say so — no blanket grace after lights-on.
 */
export const SILENT_MIN_MINUTES = 30;
export const SILENT_MIN_EXPECTED = 14;

/**
 * What is due is counted over at most the last 3 hours of a quiet spell: plenty to tell a dead counter (its
 * peers lay hundreds in that time, and belts run at set times run more often), and it keeps the raw readings
 * read for a counter dead for days small.
 */
export const SILENT_LOOK_BACK_HOURS = 3;

/** Hours after lights-on at which a section's count is compared with its peers' for its usual laying time. */
export const LAY_GRID_HOURS = [1, 2, 3, 4, 5, 6] as const;
/** The first hours of light, in which a section's usual laying time caps what is due from it. */
export const LAST_GRID_HOUR = LAY_GRID_HOURS[5];
/** Peers with fewer eggs than this by a grid hour say nothing about a section's count by then. */
const MIN_PEER_EGGS = 5;

export interface SectionHours {
  row: number;
  tier: number;
  /** eggs counted by each of LAY_GRID_HOURS after lights-on (cumulative) */
  byHour: readonly number[];
}

/**
 * What each section had counted by each grid hour of one day over its tier peers' median by then (null where
 * they had fewer than 5 eggs), keyed by its section spot key. A section laying late has small ratios in the
 * first hours; on belts that run at set times a late section's first run is near 0.
 */
export function dayHourRatios(
  sections: readonly SectionHours[],
): Map<string, readonly (number | null)[]> {
  const ratios = new Map<string, readonly (number | null)[]>();
  for (const s of sections) {
    const peers = sections.filter((p) => p.tier === s.tier && p.row !== s.row);
    if (peers.length === 0) continue;
    ratios.set(
      spotKeyOf('section', s.row, s.tier),
      LAY_GRID_HOURS.map((_, i) => {
        const peerEggs = median(peers.map((p) => p.byHour[i] ?? 0));
        return peerEggs >= MIN_PEER_EGGS ? (s.byHour[i] ?? 0) / peerEggs : null;
      }),
    );
  }
  return ratios;
}

/** Eggs by each of LAY_GRID_HOURS from a day's counts in fixed slots from lights-on (what hourly rollups hold). */
export function byGridHour(counted: ArrayLike<number>, slotMinutes: number): number[] {
  return LAY_GRID_HOURS.map((h) => {
    let sum = 0;
    for (let k = 0; k < (h * 60) / slotMinutes && k < counted.length; k++) sum += counted[k] ?? 0;
    return sum;
  });
}

/** A section's usual ratio by each grid hour: the median over its clean past days, null while learning. */
export function usualHourRatios(past: readonly PastDay[], key: string): (number | null)[] {
  const byHour: number[][] = LAY_GRID_HOURS.map(() => []);
  let days = 0;
  for (const day of past) {
    if (days >= NORM_DAYS) break;
    const ratios = day.hourRatios?.get(key);
    if (!ratios || day.excluded.has(key)) continue;
    days += 1;
    ratios.forEach((ratio, i) => {
      if (ratio !== null) byHour[i]?.push(ratio);
    });
  }
  return byHour.map((values) => (values.length >= MIN_CLEAN_DAYS ? median(values) : null));
}

/**
 * A section's usual ratio to its peers at a time of the day: the smaller of the grid hours either side of it
 * (a late section's ratio only grows through the morning, so the smaller is the safe side), null after the
 * last grid hour or while neither is known.
 */
export function usualRatioAt(
  usual: readonly (number | null)[],
  hoursSinceLightsOn: number,
): number | null {
  const after = LAY_GRID_HOURS.findIndex((h) => h >= hoursSinceLightsOn);
  if (after < 0) return null;
  const known = [usual[after - 1], usual[after]].filter(
    (r): r is number => r !== null && r !== undefined,
  );
  return known.length ? Math.min(...known) : null;
}

/**
 * The first eggs of a day are no evidence: until its peers have laid this share of a day, a section's zero
 * may be minutes of lateness (the first eggs rise as the cube of the time, so ten minutes late is a third of
 * them). It is where a section's laying window is taken to start (bench:detect).
 */
export const FIRST_EGGS_SHARE = 0.05;

export interface SilenceInput {
  /** minutes since the section's belt last counted an egg */
  quietMinutes: number;
  /** eggs each tier peer counted after that last egg (at most SILENT_LOOK_BACK_HOURS back), up to now */
  peersEggs: readonly number[];
  /** the section's usual log ratio to its peers (complete days) */
  baselineLogRatio: number;
  /**
   * In the first hours of light (up to the last of LAY_GRID_HOURS): what each tier peer and the section itself
   * have counted since lights-on, and the section's usual ratio to its peers by now (usualRatioAt; null while
   * not learned).
   */
  today?: {
    peers: readonly number[];
    own: number;
    usualRatio: number | null;
    /** the peers' median count of their last complete day (null when unknown) */
    peersDay: number | null;
  };
}

/**
 * What the section should have counted since its last egg, and whether counting none is silence. Nothing is
 * due while its peers are still on their first eggs of the day, and in the first hours of light the due is at
 * most what its usual ratio by this hour says it should have counted today and has not.
 */
export function judgeSilence(input: SilenceInput): { due: number; isSilent: boolean } {
  let due = input.peersEggs.length
    ? median([...input.peersEggs]) * Math.exp(input.baselineLogRatio)
    : 0;
  const today = input.today;
  if (today && today.peers.length > 0) {
    const peersToday = median([...today.peers]);
    if (today.peersDay !== null && peersToday < FIRST_EGGS_SHARE * today.peersDay) due = 0;
    if (today.usualRatio !== null)
      due = Math.min(due, Math.max(0, peersToday * today.usualRatio - today.own));
  }
  return {
    due,
    isSilent: input.quietMinutes >= SILENT_MIN_MINUTES && due >= SILENT_MIN_EXPECTED,
  };
}

/**
 * The silent check over counts that arrive in fixed slots (15 minutes in bench:detect and its tests), the way
 * the server runs it on raw readings: each slot's counts are added, and every section that counted nothing
 * is judged against what its tier peers counted since its last egg. Slots are absolute (day × slotsPerDay +
 * slot of the day) and fed in order; `dayOf` is a production day's first slot.
 */
export class SlotSilenceWatch {
  private readonly prefixes: Float64Array[];
  private readonly lastCount: number[];
  private readonly peersOf: number[][];
  readonly keys: string[];

  constructor(
    sections: readonly { row: number; tier: number }[],
    totalSlots: number,
    private readonly slot: { minutes: number; perDay: number; light: number },
  ) {
    this.keys = sections.map((s) => spotKeyOf('section', s.row, s.tier));
    this.prefixes = sections.map(() => new Float64Array(totalSlots + 1));
    this.lastCount = sections.map(() => -1);
    this.peersOf = sections.map((s, i) =>
      sections.flatMap((p, j) => (p.tier === s.tier && j !== i ? [j] : [])),
    );
  }

  /**
   * Adds one slot's counts (in the sections' order) and judges it when `judge` is given (within the hours
   * of light): returns each section with its verdict (null when it counted) — or adds it only, for data
   * that arrives after its day.
   */
  step(
    at: number,
    counted: readonly number[],
    judge?: {
      baselineLogRatio(key: string): number;
      usualRatios(key: string): readonly (number | null)[];
    },
  ): { key: string; counted: boolean; verdict: { due: number; isSilent: boolean } | null }[] {
    const dayStart = at - (at % this.slot.perDay);
    counted.forEach((eggs, i) => {
      const sum = this.prefixes[i];
      if (sum) sum[at + 1] = (sum[at] ?? 0) + eggs;
      if (eggs > 0) this.lastCount[i] = at;
    });
    const eggsOf = (i: number, from: number, to = at + 1) =>
      from < 0 || to <= from ? 0 : (this.prefixes[i]?.[to] ?? 0) - (this.prefixes[i]?.[from] ?? 0);
    const isLight = at - dayStart < this.slot.light;
    return this.keys.map((key, i) => {
      if ((counted[i] ?? 0) > 0 || !judge || !isLight)
        return { key, counted: (counted[i] ?? 0) > 0, verdict: null };
      const since = (this.lastCount[i] ?? -1) + 1;
      const window = Math.max(since, at + 1 - (SILENT_LOOK_BACK_HOURS * 60) / this.slot.minutes);
      const peers = this.peersOf[i] ?? [];
      const yesterday = dayStart - this.slot.perDay;
      const hours = ((at - dayStart + 1) * this.slot.minutes) / 60;
      const verdict = judgeSilence({
        quietMinutes: (at + 1 - since) * this.slot.minutes,
        peersEggs: peers.map((p) => eggsOf(p, window)),
        baselineLogRatio: judge.baselineLogRatio(key),
        today:
          hours > LAST_GRID_HOUR
            ? undefined
            : {
                peers: peers.map((p) => eggsOf(p, dayStart)),
                own: eggsOf(i, dayStart),
                usualRatio: usualRatioAt(judge.usualRatios(key), hours),
                peersDay:
                  yesterday >= 0 && peers.length
                    ? median(peers.map((p) => eggsOf(p, yesterday, dayStart)))
                    : null,
              },
      });
      return { key, counted: false, verdict };
    });
  }
}
