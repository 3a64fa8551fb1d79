/**
 * Flock records and the production figures a manager keeps (../shared/TRADE-FACTS.md §1): hens alive per
 * day, hen-days, hen-day and hen-housed production, eggs per hen housed, mortality and livability.
 *
 * Day-count convention of the product: the hens of a day are those alive at its start, so a hen found dead
 * (or culled) on day D still counts for day D and is gone from D + 1; the mortality entry of the morning walk
 * belongs to the day it is entered for. Hens placed count from their placement day. (The textbook of worked
 * example E2 counts a dead bird only up to the day before it died, and an added bird from the day after it
 * was added: `henDays` takes either convention.)
 */
import { addDays } from './windows';

export interface LossEntry {
  /** YYYY-MM-DD */
  date: string;
  dead: number;
  culled: number;
}

/** Hens alive on each day of [firstDay, lastDay] by the product's convention (losses leave the next day). */
export function hensAliveByDay(
  flock: { placedOn: string; hensHoused: number; endedOn: string | null },
  losses: readonly LossEntry[],
  firstDay: string,
  lastDay: string,
): Map<string, number> {
  const byDay = new Map<string, number>();
  for (const l of losses) byDay.set(l.date, (byDay.get(l.date) ?? 0) + l.dead + l.culled);
  const sorted = [...byDay.entries()].sort((a, b) => (a[0] < b[0] ? -1 : 1));
  const result = new Map<string, number>();
  let lostBefore = 0;
  let i = 0;
  for (let day = firstDay; day <= lastDay; day = addDays(day, 1)) {
    while (i < sorted.length && (sorted[i]?.[0] ?? '') < day) {
      lostBefore += sorted[i]?.[1] ?? 0;
      i += 1;
    }
    if (day < flock.placedOn || (flock.endedOn !== null && day > flock.endedOn)) continue;
    result.set(day, Math.max(0, flock.hensHoused - lostBefore));
  }
  return result;
}

export interface HeadcountChange {
  /** day of the month or of the period, 1-based */
  day: number;
  /** birds added (positive) or lost (negative) that day */
  change: number;
}

/**
 * Hen-days of a period of `days` days that starts with `start` birds. `countsChangeDay` says how a change
 * counts on its own day: 'product' — a loss still counts that day, an addition counts from that day;
 * 'textbook' — a loss does not count that day, an addition counts from the next day (worked example E2).
 */
export function henDays(
  start: number,
  changes: readonly HeadcountChange[],
  days: number,
  convention: 'product' | 'textbook' = 'product',
): number {
  let total = 0;
  for (let d = 1; d <= days; d++) {
    let birds = start;
    for (const c of changes) {
      const isCounted =
        c.change < 0
          ? convention === 'product'
            ? c.day < d
            : c.day <= d
          : convention === 'product'
            ? c.day <= d
            : c.day < d;
      if (isCounted) birds += c.change;
    }
    total += birds;
  }
  return total;
}

/**
 * The eggs a house laid, for production figures: the collector's count where it counted (it sees every egg
 * of the house), else the belts' sum (which misses what a dead counter did not count).
 */
export function eggsLaid(belts: number, collector: number | null): number {
  return collector !== null && collector > 0 ? collector : belts;
}

/** Hen-day egg production, %: eggs ÷ hen-days × 100 (DAGRIS; IASRI "Production indices – Layers"). */
export function henDayProductionPct(eggs: number, henDaysTotal: number): number | null {
  return henDaysTotal > 0 ? (100 * eggs) / henDaysTotal : null;
}

/** Hen-housed egg production, %: eggs ÷ (hens housed × days) × 100 (DAGRIS; IASRI). */
export function henHousedProductionPct(
  eggs: number,
  hensHoused: number,
  days: number,
): number | null {
  return hensHoused > 0 && days > 0 ? (100 * eggs) / (hensHoused * days) : null;
}

/** Eggs per hen housed: total eggs ÷ hens housed, a number, not a % (IASRI). */
export function eggsPerHenHoused(eggs: number, hensHoused: number): number | null {
  return hensHoused > 0 ? eggs / hensHoused : null;
}

/** Cumulative mortality, %: all losses so far ÷ hens housed × 100 (common practice). */
export function cumulativeMortalityPct(lost: number, hensHoused: number): number | null {
  return hensHoused > 0 ? (100 * lost) / hensHoused : null;
}

/** Livability, %: 100 − cumulative mortality (common practice; no birds added). */
export function livabilityPct(lost: number, hensHoused: number): number | null {
  const mortality = cumulativeMortalityPct(lost, hensHoused);
  return mortality === null ? null : 100 - mortality;
}

/** Age in whole weeks on a day, from the age at placement. */
export function ageInWeeks(placedOn: string, ageAtPlacementWeeks: number, day: string): number {
  const days = (Date.parse(`${day}T00:00:00Z`) - Date.parse(`${placedOn}T00:00:00Z`)) / 86_400_000;
  return ageAtPlacementWeeks + Math.floor(days / 7);
}

/**
 * The compartmental lay curve of McMillan (1981): % lay = a·e^(−b·t)·(1 − e^(−c·(t − d))) for t > d, where
 * t is age in weeks and d the age at first egg. Equation from memory (../shared/TRADE-FACTS.md §3 marks it
 * [M]); its parameters are fitted per flock, never fixed here.
 */
export function compartmentalLay(
  t: number,
  p: { a: number; b: number; c: number; d: number },
): number {
  if (t <= p.d) return 0;
  return p.a * Math.exp(-p.b * t) * (1 - Math.exp(-p.c * (t - p.d)));
}

/** Coefficient of determination of fitted values against observed ones. */
export function rSquared(observed: readonly number[], fitted: readonly number[]): number | null {
  if (observed.length < 2 || observed.length !== fitted.length) return null;
  const mean = observed.reduce((s, v) => s + v, 0) / observed.length;
  const total = observed.reduce((s, v) => s + (v - mean) ** 2, 0);
  const residual = observed.reduce((s, v, i) => s + (v - (fitted[i] ?? 0)) ** 2, 0);
  return total > 0 ? 1 - residual / total : null;
}

/** A fit is trusted for expectations when it explains most of the weekly variation over enough weeks. */
export function isFitGoodEnough(fit: { r2: number | null; weeks: number }): boolean {
  return fit.r2 !== null && fit.r2 >= 0.8 && fit.weeks >= 6;
}
