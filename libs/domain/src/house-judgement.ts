import {
  ALARM_Z,
  COMPLETE_DAY,
  CONFIRM_AT_ONCE_Z,
  CONFIRM_Z,
  CONFIRM_WITHIN_STAGES,
  cusumStep,
  CUSUM_START,
  effectiveWobble,
  learnNorm,
  logRatio,
  measureSpots,
  MIN_CLEAN_DAYS,
  spotKeyOf,
  STAGES,
  judgeSpot,
  type CusumState,
  type SectionCounts,
  type SpotMeasure,
  type SpotScope,
  type SpotVerdict,
} from './detection';
import { SILENT_MIN_EXPECTED } from './silent-counter';

/** One complete past day of a house, reduced to what judging needs: each spot's log ratio at each stage. */
export interface PastDay {
  day: string;
  /** per stage: spot key → log ratio to its yardstick */
  logRatios: readonly ReadonlyMap<string, number>[];
  /** spot keys that had an exception that day: not learned as normal */
  excluded: ReadonlySet<string>;
  /** section spot key → its count by each of LAY_GRID_HOURS over its peers' (see dayHourRatios) */
  hourRatios?: ReadonlyMap<string, readonly (number | null)[]>;
}

/** A complete day's spot log ratios at every stage, to keep as a PastDay. */
export function pastDayOf(
  day: string,
  sections: readonly SectionCounts[],
  excluded: ReadonlySet<string>,
  filled: ReadonlyMap<string, number> = new Map(),
  hourRatios?: ReadonlyMap<string, readonly (number | null)[]>,
): PastDay {
  const logRatios: Map<string, number>[] = [];
  for (let stage = 0; stage < STAGES; stage++) {
    const map = new Map<string, number>();
    for (const m of measureSpots(sections, stage, filled)) {
      const value = logRatio(m);
      if (value !== null) map.set(m.key, value);
    }
    logRatios.push(map);
  }
  return hourRatios ? { day, logRatios, excluded, hourRatios } : { day, logRatios, excluded };
}

export interface SpotJudgement extends SpotVerdict {
  key: string;
  scope: SpotScope;
  row: number | null;
  tier: number | null;
  /** fewer than MIN_CLEAN_DAYS clean days: shown, never mailed */
  isLearning: boolean;
  /** set when the CUSUM of complete days (a slow slide), not the day itself, says short */
  isSlide: boolean;
  /** the spot's usual log ratio and effective wobble, for plain words ("far outside its usual wobble") */
  wobble: number;
  cleanDays: number;
}

export interface StageInput {
  thresholdPct: number;
  /** 0 … COMPLETE_DAY */
  stage: number;
  /** today's sections, cumulative counts by stage (only `stage` is read) */
  sections: readonly SectionCounts[];
  /** complete past days, newest first */
  past: readonly PastDay[];
  /** sections whose counter is silent now: a counter matter, filled in at their expected counts */
  silent?: ReadonlySet<string>;
  /** spots with an open exception now (absorbing the sections of a short row or tier) */
  open?: ReadonlySet<string>;
  /** log ratio a person accepted as normal for a spot */
  accepted?: ReadonlyMap<string, number>;
  /** the CUSUM of each spot before this day (complete-day stage only) */
  cusum?: ReadonlyMap<string, CusumState>;
  /**
   * spots seen short once, waiting for a later stage to confirm them: key → judged stages still to wait
   * (negative for a complete day seen three quarters of the way down, which a full sighting confirms)
   */
  pending?: ReadonlyMap<string, number>;
}

export interface StageJudgement {
  /** every spot measured, by key */
  spots: Map<string, SpotJudgement>;
  /** spots that are short now after one cause, one alarm (short rows and tiers absorb their sections) */
  short: SpotJudgement[];
  /** sections whose counter reads well above expected */
  high: SpotJudgement[];
  /** the CUSUM after this day (complete-day stage only; otherwise the input's) */
  cusum: Map<string, CusumState>;
  /** spots seen short (or near, negative) once and not yet confirmed: key → judged stages still to wait */
  pending: Map<string, number>;
  /** eggs of the house at this stage with silent sections filled in */
  houseEggs: number;
  /** expected eggs of the house with short spots at their expected counts (for the house-day check) */
  houseEggsFilled: number;
}

const scopeOf = (key: string): SpotScope => key.split(':')[0] as SpotScope;

/**
 * Judges every spot of a house at one stage of one day against its own clean history, then applies one
 * cause, one alarm: a silent section is not a shortfall (and is filled in for its row, tier and house), a
 * short row or tier absorbs its sections, and when half or more of a row's sections are short the row is
 * the finding, not each section.
 */
export function judgeStage(input: StageInput): StageJudgement {
  const silent = input.silent ?? new Set<string>();
  const open = input.open ?? new Set<string>();
  const stage = input.stage;

  // Silent sections are filled in at their expected counts: yardstick × usual ratio. A section that counted
  // nothing at all where its peers say many eggs were due is a counter matter too, even before the silent
  // check has said so (a backlog judged at once): never a shortfall of its row, tier or house.
  const filled = new Map<string, number>();
  for (const m of measureSpots(input.sections, stage)) {
    if (m.scope !== 'section') continue;
    const norm = learnNorm(cleanRatios(input.past, m.key, stage));
    const expected = m.yardstick * Math.exp(norm.baseline);
    if (silent.has(m.key) || (m.own === 0 && expected >= SILENT_MIN_EXPECTED)) {
      filled.set(m.key, expected);
    }
  }
  const measures = measureSpots(input.sections, stage, filled);

  const norms = new Map(
    measures.map((m) => [m.key, learnNorm(cleanRatios(input.past, m.key, stage))] as const),
  );
  const houseWobble = new Map<SpotScope, number | null>();
  for (const scope of ['section', 'row', 'tier'] as const) {
    const wobbles = measures
      .filter((m) => m.scope === scope)
      .map((m) => norms.get(m.key)?.wobble)
      .filter((w): w is number => w !== null && w !== undefined);
    // Pooled like variances (root mean square), not a median: a median of the spots' wobbles sits below
    // their typical value, and an alarm rule on too small a wobble cries wolf.
    houseWobble.set(
      scope,
      wobbles.length ? Math.sqrt(wobbles.reduce((a, w) => a + w * w, 0) / wobbles.length) : null,
    );
  }

  const spots = new Map<string, SpotJudgement>();
  const cusum = new Map(input.cusum ?? []);
  for (const m of measures) {
    const norm = norms.get(m.key) ?? learnNorm([]);
    // Nothing learned yet: no fair yardstick (tiers and end rows differ by design), so no judgement; and
    // peers that counted nothing (no data yet, lights off) say nothing either — least of all "recovered".
    if (norm.days === 0 || m.yardstick <= 0) continue;
    const wobble = effectiveWobble(norm, houseWobble.get(m.scope) ?? null);
    const verdict = judgeSpot(m, norm, wobble, input.thresholdPct, input.accepted?.get(m.key));
    let isSlide = false;
    if (stage === COMPLETE_DAY && norm.days >= MIN_CLEAN_DAYS) {
      const deviation = Math.log(Math.max(verdict.ratio, 1e-6));
      const step = cusumStep(
        cusum.get(m.key) ?? CUSUM_START,
        deviation,
        wobble,
        input.thresholdPct,
      );
      cusum.set(m.key, step.isAlarm ? CUSUM_START : step.state);
      // Days of evidence: a CUSUM alarm needs no further confirmation, whatever the day alone says.
      isSlide = step.isAlarm;
    }
    spots.set(m.key, {
      ...verdict,
      isShort: verdict.isShort || isSlide,
      isSlide,
      key: m.key,
      scope: m.scope,
      row: m.row,
      tier: m.tier,
      isLearning: norm.days < MIN_CLEAN_DAYS,
      wobble,
      cleanDays: norm.days,
    });
  }

  const all = [...spots.values()];
  const rowSections = new Map<number, SpotJudgement[]>();
  for (const s of all.filter((x) => x.scope === 'section')) {
    const list = rowSections.get(s.row ?? 0) ?? [];
    list.push(s);
    rowSections.set(s.row ?? 0, list);
  }
  const shortRows = new Set<number>();
  for (const s of all.filter((x) => x.scope === 'row')) {
    const sections = rowSections.get(s.row ?? 0) ?? [];
    const shortSections = sections.filter((x) => x.isShort).length;
    // Half or more of a row's sections short is the row's problem, whatever the row total says yet; a row
    // short only because one of its sections is far down (the others fine) is that section's problem.
    const isMostly = sections.length > 1 && shortSections * 2 >= sections.length;
    const others = sections.filter((x) => !x.isShort);
    const othersRatio = others.length ? others.reduce((n, x) => n + x.ratio, 0) / others.length : 0;
    const areOthersDown = othersRatio < 1 - input.thresholdPct / 200;
    const isRowShort = isMostly || (s.isShort && (shortSections === 0 || areOthersDown));
    s.isShort = isRowShort;
    if (isRowShort) shortRows.add(s.row ?? 0);
    if (open.has(s.key)) shortRows.add(s.row ?? 0);
  }
  const shortTiers = new Set<number>();
  for (const s of all.filter((x) => x.scope === 'tier')) {
    if (s.isShort || open.has(s.key)) shortTiers.add(s.tier ?? 0);
  }
  // A short row or tier absorbs its sections.
  const isAbsorbed = (s: SpotJudgement) =>
    s.scope === 'section' && (shortRows.has(s.row ?? 0) || shortTiers.has(s.tier ?? 0));
  const found = all.filter((s) => s.isShort && !isAbsorbed(s));
  // One unusual judgement is not yet an alarm: a spot seen short for the first time is held until one of
  // the next CONFIRM_WITHIN_STAGES judged stages (checkpoints and complete days) says so too — unless it is
  // far outside its wobble (CONFIRM_AT_ONCE_Z), a slow slide (the CUSUM has seen days of it), or already
  // open. The confirming judgement may be less far down (three quarters of the threshold, CONFIRM_Z
  // wobbles): a fault sitting right at the threshold, or seen first on a complete day and then at the next
  // morning's noisier checkpoint, still confirms, while two unusual judgements by chance stay rare. A spot
  // back within half the threshold is no longer held.
  const pendingBefore = input.pending ?? new Map<string, number>();
  const pending = new Map<string, number>();
  const confirmedNow: SpotJudgement[] = [];
  const isNear = (s: SpotJudgement) =>
    s.ratio < 1 - (0.75 * input.thresholdPct) / 100 && s.z <= -0.75 * ALARM_Z;
  const isConfirming = (s: SpotJudgement) =>
    s.ratio < 1 - (0.75 * input.thresholdPct) / 100 && s.z <= -CONFIRM_Z;
  // A section whose row's other sections are down too (three quarters of the threshold, on average) is
  // likely its row's fault showing first where the wobble is smallest: it waits for the row, which absorbs it
  // once short, instead of raising a second alarm for one cause. Measured in bench:detect: row faults found
  // first as a section 7 → 4 of 45 houses; section faults found as soon as before.
  const isRowDown = (s: SpotJudgement) => {
    if (s.scope !== 'section') return false;
    const others = (rowSections.get(s.row ?? 0) ?? []).filter((x) => x.key !== s.key);
    if (others.length === 0) return false;
    const ratio = others.reduce((n, x) => n + x.ratio, 0) / others.length;
    return ratio < 1 - (0.75 * input.thresholdPct) / 100;
  };
  for (const [key, left] of pendingBefore) {
    const s = spots.get(key);
    if (!s || s.isShort || isAbsorbed(s)) continue;
    if (left > 0 && isConfirming(s) && isRowDown(s)) {
      pending.set(key, left);
    } else if (left > 0 && isConfirming(s)) {
      s.isShort = true;
      confirmedNow.push(s);
    } else if (!s.isRecovered && Math.abs(left) > 1) pending.set(key, left - Math.sign(left));
  }
  // A near sighting (three quarters of the way) on a complete day is held too: a full sighting in the next
  // stages (the next day's) confirms it just as a near one confirms a full one. Not a checkpoint's: the
  // complete day that follows it counts the same eggs again, so the two would be one sighting twice.
  for (const s of stage === COMPLETE_DAY ? all : []) {
    if (s.isShort || isAbsorbed(s) || open.has(s.key) || pendingBefore.has(s.key)) continue;
    if (isNear(s)) pending.set(s.key, -CONFIRM_WITHIN_STAGES);
  }
  const short = found
    .filter((s) => {
      if (open.has(s.key)) return true;
      if (isRowDown(s)) {
        pending.set(s.key, CONFIRM_WITHIN_STAGES);
        return false;
      }
      if (s.isSlide || s.z <= -CONFIRM_AT_ONCE_Z || pendingBefore.has(s.key)) return true;
      pending.set(s.key, CONFIRM_WITHIN_STAGES);
      return false;
    })
    .concat(confirmedNow);
  // A counter reading high is a calibration matter: judged on complete days only.
  const high = all.filter((s) => s.scope === 'section' && s.isHigh && stage === COMPLETE_DAY);

  const houseEggs = measures.filter((m) => m.scope === 'tier').reduce((n, m) => n + m.own, 0);
  // Spots short now or under an open exception are filled in at their expected counts: a row or tier fault
  // (even one the day's own figures no longer call short, like a slide) is one alarm, never a house dip too.
  // A short row and a short tier share one section: counted twice, a few eggs too many — never a false dip.
  const explained = all.filter((s) => s.isShort || open.has(s.key));
  const filledRows = new Set(explained.filter((s) => s.scope === 'row').map((s) => s.row));
  const filledTiers = new Set(explained.filter((s) => s.scope === 'tier').map((s) => s.tier));
  const shortExpected = explained
    .filter((s) => s.scope !== 'section' || (!filledRows.has(s.row) && !filledTiers.has(s.tier)))
    .reduce((n, s) => n + Math.max(0, s.expected - s.eggs), 0);
  return {
    spots,
    short,
    high,
    cusum,
    pending,
    houseEggs: houseEggs || sumOwn(measures),
    houseEggsFilled: (houseEggs || sumOwn(measures)) + shortExpected,
  };
}

function sumOwn(measures: readonly SpotMeasure[]): number {
  return measures.filter((m) => m.scope === 'row').reduce((n, m) => n + m.own, 0);
}

/** A spot's log ratios at one stage over its clean past days, newest first. */
function cleanRatios(past: readonly PastDay[], key: string, stage: number): number[] {
  const values: number[] = [];
  for (const day of past) {
    if (isExcluded(day.excluded, key)) continue;
    const value = day.logRatios[stage]?.get(key);
    if (value !== undefined) values.push(value);
  }
  return values;
}

/** A section's day is excluded too when its row or tier had an exception (its ratio was off then). */
function isExcluded(excluded: ReadonlySet<string>, key: string): boolean {
  if (excluded.has(key)) return true;
  if (scopeOf(key) !== 'section') return false;
  const [, row, tier] = key.split(':');
  return (
    excluded.has(spotKeyOf('row', Number(row), null)) ||
    excluded.has(spotKeyOf('tier', null, Number(tier)))
  );
}
