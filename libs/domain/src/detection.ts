import { median } from './statistics';

/**
 * The shortfall engine's judgement, as pure functions over numbers the server (or the benchmark) gathers.
 *
 * Built for real counts, which are noisier than counting noise alone (DESIGN.md § The computation):
 * - every spot (section, row, tier) is measured as a ratio to its yardstick — a section to the median of its
 *   tier peers, a row to the median of the other rows, a tier to the rest of the house (so its own drop does
 *   not dilute the yardstick) — and judged against its own usual ratio, learned from its clean days;
 * - a complete production day is judged once, and within the day only at fixed checkpoints after lights-on,
 *   each against what the spot usually has by that hour;
 * - each spot's own wobble is estimated robustly (MAD) from its history, shrunk toward its house's, so an
 *   alarm needs both: more than the threshold below expected AND far outside that spot's usual wobble;
 * - a one-sided CUSUM on the complete days catches slow slides that a day-by-day rule learns as normal.
 */

/** Hours after lights-on at which a day is looked at before it is complete. */
export const CHECKPOINT_HOURS = [5, 10] as const;
/** Stages of a production day: the checkpoints, then the complete day. */
export const STAGES = CHECKPOINT_HOURS.length + 1;
export const COMPLETE_DAY = STAGES - 1;

/** At most this many clean days make a spot's usual ratio (about four weeks). */
export const NORM_DAYS = 28;
/** Fewer clean days than this and a spot is still learning: shown, never mailed. */
export const MIN_CLEAN_DAYS = 3;
/** How unusual (in the spot's own standard deviations) a shortfall must be, besides the threshold. */
export const ALARM_Z = 4;
/**
 * How unusual a first sighting must be to be an alarm at once; a less unusual one waits for one of the next
 * judged stages to confirm it (two unusual judgements close together, the idea of the Western Electric run
 * rules — NIST/SEMATECH e-Handbook §6.3.2). 6 wobbles: a section about 18 % down, any row or tier past the
 * threshold. Measured in bench:detect: false exceptions 0.078 → 0.022 per house-week.
 */
export const CONFIRM_AT_ONCE_Z = 6;
/**
 * How unusual a judgement after a first sighting must be to confirm it: 2 wobbles, after one of 4 (the run
 * rule "two of three points beyond 2σ" — NIST/SEMATECH e-Handbook §6.3.2). Measured in bench:detect (5 seeds
 * a kind): 3 wobbles left a section 15 % down that was seen first on a complete day and then at the next
 * morning's 5-hour checkpoint (z −2.3) unconfirmed till the 10-hour one — section −15 % within 2 days 93.3 %
 * → 100 %, false exceptions 0.020 → 0.035 per house-week.
 */
export const CONFIRM_Z = 2;
/** How many judged stages after a first sighting may confirm it (about one production day). */
export const CONFIRM_WITHIN_STAGES = 3;
/** CUSUM reference value k and decision interval h, in standard deviations (see cusumStep). */
export const CUSUM_K = 0.5;
export const CUSUM_H = 5;
/** Weight, in days, of the house's pooled wobble in each spot's own (empirical-Bayes shrinkage). */
const SHRINK_DAYS = 28;
/**
 * A spot's wobble is never taken as less than this (log ratio, 2 %): real sections are never steadier from day
 * to day (hens choose their nests anew), so an unnaturally steady history (a tidy simulator, daily totals
 * loaded from elsewhere) cannot make every small difference look far outside it.
 */
const MIN_WOBBLE = 0.02;
/** Wobble assumed while nothing is known yet about a spot or its house. */
const DEFAULT_WOBBLE = 0.06;

export type SpotScope = 'section' | 'row' | 'tier';

export interface SectionCounts {
  row: number;
  tier: number;
  /** eggs counted by the end of each stage: [by each checkpoint…, complete day] (cumulative) */
  byStage: readonly number[];
}

/** One spot at one stage of one day: its own eggs and its yardstick (what its peers laid). */
export interface SpotMeasure {
  key: string;
  scope: SpotScope;
  row: number | null;
  tier: number | null;
  own: number;
  yardstick: number;
}

export const spotKeyOf = (scope: SpotScope, row: number | null, tier: number | null) =>
  `${scope}:${row ?? '-'}:${tier ?? '-'}`;

/**
 * Every spot of a house at one stage of one day. Sections in `filled` (a silent counter) are counted at
 * their expected value instead, so a dead counter does not make its row, tier or house look short.
 */
export function measureSpots(
  sections: readonly SectionCounts[],
  stage: number,
  filled: ReadonlyMap<string, number> = new Map(),
): SpotMeasure[] {
  const eggsOf = (s: SectionCounts) =>
    filled.get(spotKeyOf('section', s.row, s.tier)) ?? s.byStage[stage] ?? 0;
  const measures: SpotMeasure[] = [];
  const byTier = new Map<number, SectionCounts[]>();
  const rowTotals = new Map<number, number>();
  const tierTotals = new Map<number, number>();
  let house = 0;
  for (const s of sections) {
    const list = byTier.get(s.tier) ?? [];
    list.push(s);
    byTier.set(s.tier, list);
    const eggs = eggsOf(s);
    rowTotals.set(s.row, (rowTotals.get(s.row) ?? 0) + eggs);
    tierTotals.set(s.tier, (tierTotals.get(s.tier) ?? 0) + eggs);
    house += eggs;
  }
  for (const s of sections) {
    const key = spotKeyOf('section', s.row, s.tier);
    // A silent section is a counter matter: it is not measured as a shortfall at all.
    if (filled.has(key)) continue;
    const peers = (byTier.get(s.tier) ?? []).filter((p) => p.row !== s.row).map(eggsOf);
    if (peers.length === 0) continue;
    measures.push({
      key,
      scope: 'section',
      row: s.row,
      tier: s.tier,
      own: eggsOf(s),
      yardstick: median(peers),
    });
  }
  for (const [row, own] of rowTotals) {
    const others = [...rowTotals].filter(([r]) => r !== row).map(([, e]) => e);
    if (others.length === 0) continue;
    measures.push({
      key: spotKeyOf('row', row, null),
      scope: 'row',
      row,
      tier: null,
      own,
      yardstick: median(others),
    });
  }
  if (tierTotals.size > 1) {
    for (const [tier, own] of tierTotals) {
      measures.push({
        key: spotKeyOf('tier', null, tier),
        scope: 'tier',
        row: null,
        tier,
        own,
        yardstick: house - own,
      });
    }
  }
  return measures;
}

/** The natural log of own ÷ yardstick, or null when either is empty. */
export function logRatio(m: Pick<SpotMeasure, 'own' | 'yardstick'>): number | null {
  return m.own > 0 && m.yardstick > 0 ? Math.log(m.own / m.yardstick) : null;
}

/**
 * Small-sample factors that make the scaled MAD of n normal values unbiased, for n = 2 … 9 (Croux &
 * Rousseeuw 1992, "Time-efficient algorithms for two highly robust estimators of scale" — values from
 * memory [M]; the spec checks each by Monte Carlo). Without them the MAD of three days runs a third low.
 */
const MAD_SMALL_SAMPLE: Readonly<Record<number, number>> = {
  2: 1.196,
  3: 1.495,
  4: 1.363,
  5: 1.206,
  6: 1.2,
  7: 1.14,
  8: 1.129,
  9: 1.107,
};

/**
 * Median absolute deviation scaled to a normal standard deviation (× 1.4826; NIST e-Handbook §1.3.5.17),
 * with the small-sample factor: the table above for n ≤ 9 and n / (n − 0.8) beyond (Croux & Rousseeuw 1992
 * — from memory [M]; checked by Monte Carlo in the spec). The plain MAD of a few days runs low, and an alarm
 * rule on too small a wobble cries wolf.
 */
export function robustSd(values: readonly number[]): number | null {
  if (values.length < 2) return null;
  const centre = median(values);
  const mad = 1.4826 * median(values.map((v) => Math.abs(v - centre)));
  const n = values.length;
  return n > 9 ? (mad * n) / (n - 0.8) : mad * (MAD_SMALL_SAMPLE[n] ?? 1);
}

/** What a spot's clean history says it usually is at one stage. */
export interface SpotNorm {
  /** usual log ratio to its yardstick */
  baseline: number;
  /** own day-to-day wobble of the log ratio, before shrinkage */
  wobble: number | null;
  /** clean days it was learned from */
  days: number;
}

/** A spot's usual log ratio and wobble from its clean past log ratios (newest first; at most NORM_DAYS used). */
export function learnNorm(pastLogRatios: readonly number[]): SpotNorm {
  const recent = pastLogRatios.slice(0, NORM_DAYS);
  if (recent.length === 0) return { baseline: 0, wobble: null, days: 0 };
  return { baseline: median(recent), wobble: robustSd(recent), days: recent.length };
}

/**
 * A spot's wobble shrunk toward its house's (the median wobble of spots of the same scope): with few days of
 * its own, a spot borrows its house's; with many, it keeps its own. The uncertainty of a median baseline of
 * n days adds about π/2 · σ²/n to the variance of today's comparison.
 */
export function effectiveWobble(norm: SpotNorm, houseWobble: number | null): number {
  const pooled = houseWobble ?? norm.wobble ?? DEFAULT_WOBBLE;
  const own = norm.wobble ?? pooled;
  const n = norm.days;
  const shrunk = Math.sqrt((n * own * own + SHRINK_DAYS * pooled * pooled) / (n + SHRINK_DAYS));
  const baselineUncertainty = n > 0 ? (Math.PI / 2) * (1 / n) : 1;
  return Math.max(MIN_WOBBLE, shrunk * Math.sqrt(1 + baselineUncertainty));
}

export interface SpotVerdict {
  eggs: number;
  expected: number;
  /** eggs ÷ expected */
  ratio: number;
  /** how unusual, in the spot's own standard deviations (negative: below expected) */
  z: number;
  /** more than the threshold below expected AND far outside the spot's usual wobble */
  isShort: boolean;
  /** back within half the threshold */
  isRecovered: boolean;
  /** more than the threshold above expected and as unusual: a counter reading high */
  isHigh: boolean;
}

/**
 * Judges one spot: expected = yardstick × its usual ratio (or the ratio a person accepted as normal for it,
 * when lower). Short needs both the threshold (the trade's rule of thumb, 10 % by default: common practice,
 * no published source) and z ≤ −ALARM_Z.
 */
export function judgeSpot(
  measure: Pick<SpotMeasure, 'own' | 'yardstick'>,
  norm: SpotNorm,
  wobble: number,
  thresholdPct: number,
  acceptedLogRatio?: number | null,
): SpotVerdict {
  const baseline =
    acceptedLogRatio !== undefined && acceptedLogRatio !== null
      ? Math.min(norm.baseline, acceptedLogRatio)
      : norm.baseline;
  const expected = measure.yardstick * Math.exp(baseline);
  const observed = logRatio(measure);
  // Nothing counted where eggs were expected is as far below as it gets; nothing expected is no judgement.
  const deviation = observed === null ? (expected > 0 ? -Infinity : 0) : observed - baseline;
  const ratio = expected > 0 ? measure.own / expected : 1;
  const z = deviation / wobble;
  const threshold = thresholdPct / 100;
  return {
    eggs: measure.own,
    expected,
    ratio,
    z,
    isShort: expected > 0 && ratio < 1 - threshold && z <= -ALARM_Z,
    isRecovered: ratio >= 1 - threshold / 2,
    isHigh: expected > 0 && ratio > 1 + threshold && z >= ALARM_Z,
  };
}

/** A one-sided lower CUSUM over a spot's complete days, with its last few days. */
export interface CusumState {
  /** S ≤ 0; an alarm below −h */
  sum: number;
  /** the log deviations of the last CUSUM_RECENT_DAYS days of the current run, newest last */
  recent: readonly number[];
}
export const CUSUM_START: CusumState = { sum: 0, recent: [] };
/** Days whose mean must be ¾ of the threshold below for a CUSUM alarm. */
export const CUSUM_RECENT_DAYS = 3;

/**
 * One complete day into the tabular CUSUM for a downward shift (NIST/SEMATECH e-Handbook §6.3.2.3, lower
 * side: S_lo = max(0, S_lo + target − k − x), here on standardised log deviations and written as S = min(0,
 * S + u + k)). k = 0.5 and h = 5 are the usual choice for detecting a one-sigma shift (Montgomery, Introduction
 * to Statistical Quality Control, §9.1 — from memory [M]): an in-control run length of about 900 days per
 * spot on its own; an alarm also needs the run's last few days to be, on average, at least ¾ of the
 * threshold below, so a long run of small wobbles is never called a shortfall (measured in bench:detect: no
 * more false exceptions than with h = 8, and a 10 % section fault found about a day sooner).
 */
export function cusumStep(
  state: CusumState,
  logDeviation: number,
  wobble: number,
  thresholdPct: number,
  tuning: { k: number; h: number; clamp: number } = { k: CUSUM_K, h: CUSUM_H, clamp: 10 },
): { state: CusumState; isAlarm: boolean; recentRatio: number } {
  // One wild day (a glitch) moves the sum by at most `clamp` standard deviations.
  const u = Math.max(-tuning.clamp, logDeviation / wobble);
  const sum = Math.min(0, state.sum + u + tuning.k);
  const next: CusumState =
    sum === 0
      ? CUSUM_START
      : { sum, recent: [...state.recent, logDeviation].slice(-CUSUM_RECENT_DAYS) };
  const recentRatio =
    next.recent.length > 0
      ? Math.exp(next.recent.reduce((a, b) => a + b, 0) / next.recent.length)
      : 1;
  // A slide takes days: one bad day alone is the day's own judgement, never a CUSUM alarm.
  const isAlarm =
    next.recent.length >= 2 && sum < -tuning.h && recentRatio < 1 - (0.75 * thresholdPct) / 100;
  return { state: next, isAlarm, recentRatio };
}

/**
 * The collector against the sum of the belts over complete days (the last two summed, so eggs still on their
 * way at a day's end do not matter): a gap of more than `pct` % that its usual wobble cannot explain.
 */
export function judgeCollector(
  collector: number,
  belts: number,
  pastLogRatios: readonly number[],
  pct = 3,
): { ratio: number; z: number; isGap: boolean; isRecovered: boolean } {
  const ratio = belts > 0 ? collector / belts : 1;
  const wobble = Math.max(0.004, robustSd(pastLogRatios.slice(0, NORM_DAYS)) ?? 0.01);
  const z = Math.log(Math.max(ratio, 1e-9)) / wobble;
  return {
    ratio,
    z,
    isGap: belts > 0 && Math.abs(ratio - 1) > pct / 100 && Math.abs(z) >= ALARM_Z,
    isRecovered: Math.abs(ratio - 1) <= pct / 200,
  };
}

/**
 * The house's hen-day production of a complete day (from the collector, or from the belts with silent and
 * short spots filled in at their expected counts) against what it usually lays: more than `pct` % below and
 * outside its usual day-to-day wobble. Spots already short are filled in, so a row or tier fault is one alarm.
 */
export function judgeHouseDay(
  henDayPct: number,
  pastHenDayPct: readonly number[],
  pct = 5,
): { expected: number; ratio: number; z: number; isDip: boolean; isRecovered: boolean } {
  const recent = pastHenDayPct.slice(0, 7);
  const expected = recent.length ? median(recent) : henDayPct;
  const logs = recent.map((v) => Math.log(v / expected));
  const wobble = Math.max(0.01, robustSd(logs) ?? 0.02);
  const ratio = expected > 0 ? henDayPct / expected : 1;
  const z = Math.log(Math.max(ratio, 1e-9)) / wobble;
  return {
    expected,
    ratio,
    z,
    isDip: recent.length >= MIN_CLEAN_DAYS && ratio < 1 - pct / 100 && z <= -ALARM_Z,
    isRecovered: ratio >= 1 - pct / 200,
  };
}

/** A whole number with thousands separators, the way people read egg counts. */
export function formatCount(value: number): string {
  return Math.round(value).toLocaleString('en-US');
}

/** How unusual a finding is, in words (from its one-sided tail probability): never a p-value. */
export function unusualWords(tailProbability: number): string {
  // z ≤ −4 (the alarm rule) has a one-sided normal tail of about 3·10⁻⁵; z ≤ −3 about 1.3·10⁻³.
  if (tailProbability <= 3.2e-5) return "far outside this spot's usual day-to-day wobble";
  if (tailProbability <= 1.35e-3) return "well outside this spot's usual day-to-day wobble";
  return 'within what this spot sometimes does';
}

/** What an exception measured, in plain words with separated thousands and no p-values. */
export function measuredWords(e: {
  kind: 'shortfall' | 'silent_counter' | 'collector_gap' | 'house_dip';
  eggs: number;
  expected: number;
  ratio: number;
  pValue: number;
}): string {
  switch (e.kind) {
    case 'shortfall': {
      const below = Math.round((1 - e.ratio) * 100);
      return `${below} % below expected: ${formatCount(e.eggs)} eggs where ${formatCount(e.expected)} were expected — ${unusualWords(e.pValue)}`;
    }
    case 'silent_counter':
      return e.expected > 0
        ? `counted nothing where its peers say about ${formatCount(e.expected)} eggs were due — not chance`
        : 'counted nothing while its peers counted';
    case 'collector_gap': {
      const pct = Math.round(Math.abs(e.ratio - 1) * 1000) / 10;
      return `the collector counted ${pct} % ${e.ratio >= 1 ? 'more' : 'fewer'} eggs than the belts (${formatCount(e.eggs)} against ${formatCount(e.expected)})`;
    }
    case 'house_dip':
      return `hen-day production ${Math.round(e.eggs * 10) / 10} % against ${Math.round(e.expected * 10) / 10} % expected`;
  }
}
