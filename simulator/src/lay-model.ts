import { cumulativeStdNormalProbability } from 'simple-statistics';

/**
 * Hen-day lay rate (fraction of hens laying per day) by flock age, from the compartmental model attributed
 * to McMillan (1970/1981): y = a·e^(−b·t)·(1 − e^(−c·(t − d))), t = age in weeks, d = age at first egg.
 * The equation is from memory (TRADE-FACTS.md §3, [M]); the defaults are chosen so the curve agrees with
 * IASRI's published shape (lay from ≈21 wk, ≥ 90 % by 28 wk, ≤ 70 % by 72 wk — TRADE-FACTS.md §2, [S]).
 * `a` is above 1 because the decline term runs from age 0; the rate is capped at 1.
 */
export interface LayCurve {
  /** peak scale (fraction) */
  a: number;
  /** decline per week after peak */
  b: number;
  /** rise rate per week */
  c: number;
  /** age at first egg, weeks */
  d: number;
}

export const DEFAULT_LAY_CURVE: LayCurve = { a: 1.26, b: 0.0082, c: 0.35, d: 19 };

export function layRate(ageWeeks: number, curve: LayCurve = DEFAULT_LAY_CURVE): number {
  if (ageWeeks <= curve.d) return 0;
  const rate =
    curve.a * Math.exp(-curve.b * ageWeeks) * (1 - Math.exp(-curve.c * (ageWeeks - curve.d)));
  return Math.min(1, Math.max(0, rate));
}

/**
 * When in the light period eggs are laid: a normal distribution of lay times centred `peakHours` after
 * lights-on, cut to the light period (no eggs in the dark). 4.5 h with a 2 h spread puts about half the
 * day's eggs in the first 5 hours of a 16 h day, as Patterson (1997) implies for 16L:8D
 * (TRADE-FACTS.md §2, [S]/[C]).
 */
export interface LayTiming {
  peakHours: number;
  spreadHours: number;
}

export const DEFAULT_LAY_TIMING: LayTiming = { peakHours: 4.5, spreadHours: 2 };

/** Share of the day's eggs laid between `fromHours` and `toHours` after lights-on. */
export function layShare(
  fromHours: number,
  toHours: number,
  photoperiodHours: number,
  timing: LayTiming = DEFAULT_LAY_TIMING,
): number {
  const clamp = (h: number) => Math.min(Math.max(h, 0), photoperiodHours);
  const cdf = (h: number) =>
    cumulativeStdNormalProbability((h - timing.peakHours) / timing.spreadHours);
  const whole = cdf(photoperiodHours) - cdf(0);
  const from = clamp(fromHours);
  const to = clamp(toHours);
  if (to <= from || whole <= 0) return 0;
  return (cdf(to) - cdf(from)) / whole;
}
