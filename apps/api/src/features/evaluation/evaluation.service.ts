/**
 * The engine's evaluation cycle of one house: read what is due (judgeDue, measure), decide with libs/domain
 * (the judgements and `planExceptionChanges`) and save it in one transaction (apply); live every few seconds
 * (evaluateNow) or replayed over past days (evaluateHistory). Longer than our ~350 lines on purpose: the steps
 * share one evaluation's engine state (what was judged, each spot's CUSUM, the data-late rules), and split
 * apart they would pass it around by hand. What is not the cycle lives beside it: house-baseline.ts (past
 * days and their caches), house-map.service.ts (the read models), the *.repository.ts files (storage).
 */
import type { Database, Queryable } from '@tierscope/db';
import {
  addDays,
  CHECKPOINT_HOURS,
  COMPLETE_DAY,
  judgeStage,
  planExceptionChanges,
  type EvaluationFinding,
  type KnownException,
  NORM_DAYS,
  normalUpperTail,
  type StageJudgement,
  daysOf,
  findingKey,
  judgeSilence,
  usualHourRatios,
  usualRatioAt,
  LAST_GRID_HOUR,
  SILENT_LOOK_BACK_HOURS,
  spotKeyOf,
  judgeCollectorGap,
  judgeHouseDay,
  MIN_CLEAN_DAYS,
  judgeHouseDipAgainstCurve,
  minutesSinceLightsOn,
  productionDayOf,
  productionDayStart,
  median,
  sectionKey,
  type Streak,
} from '@tierscope/domain';
import type { EventBus } from '../../platform/events';
import {
  beltHorizons,
  collectorTotal,
  counterEggsInHours,
  sectionStageCounts,
  counterEggsSince,
  quietCounters,
  hensAlive,
  houseLayout,
  sectionDays,
  sectionEggsBetween,
} from './evaluation.repository';
import { type ExceptionRow } from './exception-rows.repository';
import {
  exceptionsOpenAt,
  exceptionsOverlapping,
  openException,
  updateException,
} from './exception-rows.repository';
import {
  readEngine,
  readEvaluation,
  writeEngine,
  writeEvaluation,
  type EngineState,
} from './evaluation-state.repository';
import { recordAudit } from '../audit/audit.repository';
import { createHouseBaseline, type Layout } from './house-baseline';
import { createHouseMap, type HouseMapReader } from './house-map.service';

/** One thing the engine measured this evaluation, for the consecutive-evaluation rule. */
type Candidate = EvaluationFinding;

/** What the change plan reads of a stored exception. */
function known(e: ExceptionRow): KnownException {
  return { ...e, lostByDay: e.lostByDay as Record<string, number> };
}

/** A counter's data counts as up to a checkpoint when its newest reading is at most this much older. */
const DATA_LATE_SLACK_MS = 20 * 60_000;
/** How long the house-dip judgement of a day is kept before it is read again. */
const HEN_DAY_REFRESH_MS = 3_600_000;
/** How long a checkpoint waits for late counters before it is judged without them. */
const DATA_LATE_WAIT_HOURS = 3;

export interface EvaluationService extends HouseMapReader {
  /** Evaluates a house now (live): today so far, silent counters, collector, yesterday's hen-day. */
  evaluateNow(houseId: number, now?: Date): Promise<{ changed: ExceptionRow[] }>;
  /** Replays past production days at five checkpoints each; idempotent. */
  evaluateHistory(
    houseId: number,
    firstDay: string,
    lastDay: string,
  ): Promise<{ changed: ExceptionRow[] }>;
}

/** The hen-day % a house's flock is expected to lay on a day, from its fitted lay curve (flocks feature). */
/** What the engine asks of a house's flock: the hen-day % its fitted curve expects on a day (flocks/flock-curves). */
export interface ExpectedLay {
  expectedHenDayPct(houseId: number, day: string): Promise<number | null>;
}

export function createEvaluationService(
  db: Database,
  events: EventBus,
  expectedLay?: ExpectedLay,
): EvaluationService {
  const baseline = createHouseBaseline(db, events);
  const houseMap = createHouseMap(db, baseline);
  const pastDays = (layout: Layout, beforeDay: string) => baseline.pastDays(layout, beforeDay);

  /**
   * The shortfall judgements due at `at`: the last complete day if it has not been judged yet (with the
   * collector against the belts over it), and each of today's checkpoints already passed and not yet judged.
   * `engine` remembers what was judged and each spot's CUSUM.
   */
  async function judgeDue(
    layout: Layout,
    at: Date,
    engine: EngineState,
    silentSections: ReadonlySet<string>,
    openAt: readonly ExceptionRow[],
    recent: readonly ExceptionRow[],
    isLive: boolean,
    /** a replay's newest reading of each section, read once for all its days */
    newest?: ReadonlyMap<number, Date>,
  ): Promise<Candidate[]> {
    const { house } = layout;
    const day = productionDayOf(at, house.timezone, house.lightsOn);
    const yesterday = addDays(day, -1);
    const minutes = minutesSinceLightsOn(at, house.timezone, house.lightsOn);
    const judgedToday = engine.checkpointDay === day ? (engine.checkpoints ?? []) : [];
    const isDayDue = !engine.completeDay || engine.completeDay < yesterday;
    const isCheckpointDue = CHECKPOINT_HOURS.some(
      (hours, stage) => minutes >= hours * 60 && !judgedToday.includes(stage),
    );
    // Most evaluations fall between checkpoints: nothing to judge, nothing to read.
    if (!isDayDue && !isCheckpointDue) return [];
    const silent = new Set([...silentSections].map((key) => `section:${key}`));
    const open = new Set(openAt.filter((e) => e.kind === 'shortfall').map((e) => findingKey(e)));
    const accepted = new Map<string, number>();
    for (const e of recent) {
      if (e.closeReason === 'normal_for_spot' && e.ratio > 0)
        accepted.set(findingKey(e), Math.log(e.ratio));
    }
    const byId = new Map(layout.sections.map((sec) => [sec.id, sec]));
    const candidates: Candidate[] = [];
    const toCandidates = (judged: StageJudgement) => {
      const shortKeys = new Set(judged.short.map((spot) => spot.key));
      for (const spot of judged.spots.values()) {
        candidates.push({
          kind: 'shortfall',
          scope: spot.scope,
          row: spot.row,
          tier: spot.tier,
          isLearning: spot.isLearning,
          eggs: spot.eggs,
          expected: spot.expected,
          ratio: spot.ratio,
          // How unusual, as the one-sided normal tail of the spot's own z.
          pValue: Number.isFinite(spot.z) ? normalUpperTail(-spot.z) : 0,
          isShort: shortKeys.has(spot.key),
          isRecovered: spot.isRecovered,
          isFinal: true,
        });
      }
    };

    // Live, yesterday is judged once every counter's data has reached its lights-off (a late gateway or a
    // backfill still under way is waited for up to DATA_LATE_WAIT_HOURS, then left out; with no data at all
    // the day waits for it, e.g. for the replay of a backfill).
    // Each counter's data horizon since yesterday's lights-on, read once for every judgement below.
    let horizonsRead: Promise<Map<number, Date>> | null = null;
    const horizonsOf = () =>
      (horizonsRead ??= beltHorizons(
        db,
        house.farmId,
        house.id,
        productionDayStart(yesterday, house.timezone, house.lightsOn),
      ));
    // A replay: the whole house's data stopping before `by` with nothing after it (the gateway went quiet and
    // has not come back) is data late, not a short day or checkpoint; it is left for the replay that comes
    // with the rest of its data.
    const isQuietBefore = (by: Date) =>
      newest !== undefined &&
      layout.sections.every((sec) => {
        const horizon = newest.get(sec.id);
        return !horizon || horizon.getTime() < by.getTime() - DATA_LATE_SLACK_MS;
      });
    const dayLate = new Set<string>();
    let isDayReady = isDayDue;
    if (isDayDue && isLive) {
      const yesterdayStart = productionDayStart(yesterday, house.timezone, house.lightsOn);
      const lightsOff = new Date(yesterdayStart.getTime() + house.photoperiodHours * 3_600_000);
      const horizons = await horizonsOf();
      for (const sec of layout.sections) {
        const horizon = horizons.get(sec.id);
        if (!horizon || horizon.getTime() < lightsOff.getTime() - DATA_LATE_SLACK_MS)
          dayLate.add(spotKeyOf('section', sec.row, sec.tier));
      }
      const waited = minutes >= DATA_LATE_WAIT_HOURS * 60;
      // Readings that stop before lights-off everywhere: a part day, never judged a house dip.
      if (dayLate.size === layout.sections.length && horizons.size > 0) engine.lateDay = yesterday;
      if (dayLate.size > 0 && !waited) isDayReady = false;
      // Still no data at all after the wait (a house fed by imports, a gateway down): nothing to judge live;
      // the replay that comes with the data judges the day.
      if (dayLate.size === layout.sections.length && waited) {
        isDayReady = false;
        engine.completeDay = yesterday;
        engine.completeDayEggs = undefined;
      }
    } else if (isDayDue) {
      const lightsOff = new Date(
        productionDayStart(yesterday, house.timezone, house.lightsOn).getTime() +
          house.photoperiodHours * 3_600_000,
      );
      if (isQuietBefore(lightsOff)) {
        isDayReady = false;
        engine.completeDay = yesterday;
        engine.completeDayEggs = undefined;
        if (newest && newest.size > 0) engine.lateDay = yesterday;
      }
    }
    if (isDayReady) {
      // The eggs of the day judged here, or none: never another day's (the house dip reads them as this day's).
      engine.completeDayEggs = undefined;
      engine.lateDay = undefined;
      const rows = await sectionStageCounts(db, house, CHECKPOINT_HOURS, yesterday, yesterday);
      const sections = rows.flatMap((r) => {
        const sec = byId.get(r.sectionId);
        return sec ? [{ row: sec.row, tier: sec.tier, byStage: r.byStage }] : [];
      });
      if (sections.length > 0) {
        const judged = judgeStage({
          thresholdPct: house.shortfallThresholdPct,
          stage: COMPLETE_DAY,
          sections,
          past: await pastDays(layout, yesterday),
          silent: new Set([...silent, ...dayLate]),
          open,
          accepted,
          cusum: new Map(Object.entries(engine.cusum ?? {})),
          pending: new Map(Object.entries(engine.pending ?? {})),
        });
        engine.pending = Object.fromEntries(judged.pending);
        engine.cusum = Object.fromEntries(
          [...judged.cusum].map(([key, state]) => [
            key,
            { sum: state.sum, recent: [...state.recent] },
          ]),
        );
        toCandidates(judged);
        engine.completeDayEggs = judged.houseEggsFilled;
        // A complete day, with silent sections filled in at their expected counts (one cause, one alarm); a
        // collector that counted nothing that day has no data to compare (not a gap).
        const collector = layout.counters.some((c) => c.kind === 'collector')
          ? await collectorTotal(db, house.farmId, house.id, yesterday, yesterday)
          : 0;
        if (collector > 0 && dayLate.size === 0) {
          const belts = judged.houseEggs;
          const gap = judgeCollectorGap(collector, belts);
          candidates.push({
            kind: 'collector_gap',
            scope: 'house',
            row: null,
            tier: null,
            isLearning: false,
            eggs: collector,
            expected: belts,
            ratio: belts > 0 ? collector / belts : 1,
            pValue: gap.pValue,
            isShort: gap.isGap,
            isRecovered: Math.abs(gap.diffPct) <= 1.5,
            isFinal: true,
          });
        }
      }
      engine.completeDay = yesterday;
    }

    if (engine.checkpointDay !== day) {
      engine.checkpointDay = day;
      engine.checkpoints = [];
    }
    const dayStart = productionDayStart(day, house.timezone, house.lightsOn);
    for (const [stage, hours] of CHECKPOINT_HOURS.entries()) {
      if (minutes < hours * 60 || engine.checkpoints?.includes(stage)) continue;
      const checkpoint = new Date(dayStart.getTime() + hours * 3_600_000);
      // Each counter's data horizon: a section whose readings have not reached the checkpoint yet (a late
      // gateway) is waited for up to DATA_LATE_WAIT_HOURS, then left out of this checkpoint (never judged on
      // part of its data: that would read as a shortfall).
      const late = new Set<string>();
      if (isLive) {
        const horizons = await horizonsOf();
        for (const sec of layout.sections) {
          const horizon = horizons.get(sec.id);
          if (!horizon || horizon.getTime() < checkpoint.getTime() - DATA_LATE_SLACK_MS)
            late.add(spotKeyOf('section', sec.row, sec.tier));
        }
        const isStillWaiting =
          at.getTime() - checkpoint.getTime() < DATA_LATE_WAIT_HOURS * 3_600_000;
        if (late.size > 0 && isStillWaiting) continue;
      } else if (isQuietBefore(checkpoint)) {
        engine.checkpoints = [...(engine.checkpoints ?? []), stage];
        continue;
      }
      const eggs = await sectionEggsBetween(db, house.farmId, house.id, dayStart, checkpoint);
      // Nothing counted by then (no gateway, or the house is empty): nothing to judge live; a replay judges
      // it when its data arrives.
      if ([...eggs.values()].every((n) => n === 0)) {
        engine.checkpoints = [...(engine.checkpoints ?? []), stage];
        continue;
      }
      engine.checkpoints = [...(engine.checkpoints ?? []), stage];
      const sections = layout.sections.map((sec) => {
        const byStage = [...CHECKPOINT_HOURS.map(() => 0), 0];
        byStage[stage] = eggs.get(sec.id) ?? 0;
        return { row: sec.row, tier: sec.tier, byStage };
      });
      const judged = judgeStage({
        thresholdPct: house.shortfallThresholdPct,
        stage,
        sections,
        past: await pastDays(layout, day),
        silent: new Set([...silent, ...late]),
        open,
        accepted,
        pending: new Map(Object.entries(engine.pending ?? {})),
      });
      engine.pending = Object.fromEntries(judged.pending);
      toCandidates(judged);
    }
    return candidates;
  }

  /** Everything measured at one instant; `current` is the day so far. */
  async function measure(
    layout: Layout,
    at: Date,
    isLive: boolean,
    engine: EngineState,
    /** a replay's newest reading of each section (see judgeDue) */
    newest?: ReadonlyMap<number, Date>,
  ): Promise<{
    day: string;
    candidates: Candidate[];
    openAt: ExceptionRow[];
    recent: ExceptionRow[];
  }> {
    const { house } = layout;
    const day = productionDayOf(at, house.timezone, house.lightsOn);
    const candidates: Candidate[] = [];

    const silent = new Set<string>();
    {
      // Live: the last 30 minutes of raw readings; a past checkpoint: the hour before it (the rollups' grain).
      const belts = layout.counters.filter((c) => c.kind === 'belt' && c.sectionId !== null);
      const beltIds = belts.map((c) => c.id);
      const recent = isLive
        ? await counterEggsSince(db, house.farmId, beltIds, new Date(at.getTime() - 30 * 60_000))
        : await counterEggsInHours(
            db,
            house.farmId,
            beltIds,
            new Date(at.getTime() - 3_600_000),
            at,
          );
      const hoursIntoDay = minutesSinceLightsOn(at, house.timezone, house.lightsOn) / 60;
      const isLight = hoursIntoDay <= house.photoperiodHours;
      const sectionOf = new Map(layout.sections.map((sec) => [sec.id, sec]));
      // Counters that sent zeros for the last 30 minutes in light are looked at closer: since when they are
      // quiet, and what their peers counted since then (at most SILENT_LOOK_BACK_HOURS back). No reading at all in the window is a late gateway
      // (its data horizon is older), not a silent counter: a dead counter still sends its zeros.
      const quiet = isLight
        ? belts.filter((b) => recent.has(b.id) && (recent.get(b.id) ?? 0) === 0)
        : [];
      const quietIds = new Set(quiet.map((b) => b.id));
      const dayStart = productionDayStart(day, house.timezone, house.lightsOn);
      const lookBack = productionDayStart(addDays(day, -1), house.timezone, house.lightsOn);
      const windowStart = new Date(at.getTime() - SILENT_LOOK_BACK_HOURS * 3_600_000);
      const isMorning = hoursIntoDay <= LAST_GRID_HOUR;
      const { last, byMinute } = await quietCounters(
        db,
        house.farmId,
        quiet.map((b) => b.id),
        beltIds,
        lookBack,
        at,
        isMorning ? dayStart : at,
        windowStart,
      );
      // Each counter's minutes once, so summing a peer after an instant reads that peer's rows only (every
      // counter is quiet in the first hour of a morning: a house's belts times their peers).
      const minutesOf = new Map<number, typeof byMinute>();
      for (const m of byMinute) {
        const list = minutesOf.get(m.counterId) ?? [];
        list.push(m);
        minutesOf.set(m.counterId, list);
      }
      const eggsAfter = (counterId: number, after: Date) =>
        (minutesOf.get(counterId) ?? [])
          .filter((m) => m.minute > after)
          .reduce((sum, m) => sum + m.eggs, 0);
      const past = quiet.length > 0 ? await pastDays(layout, day) : [];
      // Each section's last complete day, for when its peers are past their first eggs of today.
      const lastDay = quiet.length > 0 ? (await baseline.history(layout, day)).at(-1) : undefined;
      const lastDayEggs = new Map(
        (lastDay?.sections ?? []).map((sec) => [sectionKey(sec.row, sec.tier), sec.eggs]),
      );
      for (const belt of belts) {
        const section = sectionOf.get(belt.sectionId ?? -1);
        if (!section || !recent.has(belt.id)) continue;
        const key = spotKeyOf('section', section.row, section.tier);
        const own = recent.get(belt.id) ?? 0;
        let due = 0;
        let isSilentNow = false;
        if (quietIds.has(belt.id)) {
          const peers = belts.filter(
            (b) =>
              b.id !== belt.id &&
              recent.has(b.id) &&
              sectionOf.get(b.sectionId ?? -1)?.tier === section.tier,
          );
          const quietSince = last.get(belt.id) ?? lookBack;
          const from = quietSince > windowStart ? quietSince : windowStart;
          const peersLastDay = peers.flatMap((p) => {
            const sec = sectionOf.get(p.sectionId ?? -1);
            const value = sec ? lastDayEggs.get(sectionKey(sec.row, sec.tier)) : undefined;
            return value === undefined ? [] : [value];
          });
          // Each section's usual ratio to its tier peers, from its clean complete days.
          const ratios = past
            .filter((d) => !d.excluded.has(key))
            .map((d) => d.logRatios[COMPLETE_DAY]?.get(key))
            .filter((v): v is number => v !== undefined);
          const verdict = judgeSilence({
            quietMinutes: (at.getTime() - quietSince.getTime()) / 60_000,
            peersEggs: peers.map((p) => eggsAfter(p.id, from)),
            baselineLogRatio: ratios.length ? median(ratios) : 0,
            today: isMorning
              ? {
                  peers: peers.map((p) => eggsAfter(p.id, dayStart)),
                  own: eggsAfter(belt.id, dayStart),
                  usualRatio: usualRatioAt(usualHourRatios(past, key), hoursIntoDay),
                  peersDay: peersLastDay.length ? median(peersLastDay) : null,
                }
              : undefined,
          });
          due = verdict.due;
          isSilentNow = verdict.isSilent;
        }
        if (isSilentNow) silent.add(sectionKey(section.row, section.tier));
        candidates.push({
          kind: 'silent_counter',
          scope: 'section',
          row: section.row,
          tier: section.tier,
          isLearning: false,
          eggs: own,
          expected: due,
          ratio: due > 0 ? own / due : 1,
          pValue: Math.exp(-due),
          isShort: isSilentNow,
          isRecovered: own > 0,
        });
      }
    }

    // A counter already known to be silent stays so until it counts again, even when its peers are quiet.
    const openAt = await exceptionsOpenAt(db, house.id, at);
    for (const e of openAt) {
      if (e.kind === 'silent_counter' && e.row !== null && e.tier !== null)
        silent.add(sectionKey(e.row, e.tier));
    }
    // Shortfalls: the complete day once it is over, and today's fixed checkpoints once each (never a
    // running total re-tested every few seconds).
    const recent = await exceptionsOverlapping(
      db,
      house.id,
      new Date(at.getTime() - NORM_DAYS * 86_400_000),
      at,
    );
    candidates.push(
      ...(await judgeDue(layout, at, engine, silent, openAt, recent, isLive, newest)),
    );

    if (isLive) {
      // Hen-day production of the last complete day against the seven before it: read again when the day
      // or its judgement changes, else at most hourly (a corrected morning walk shows within the hour).
      const yesterday = addDays(day, -1);
      const kept = engine.henDay;
      const isFresh =
        kept?.day === yesterday &&
        kept.completeDay === engine.completeDay &&
        at.getTime() - kept.at < HEN_DAY_REFRESH_MS;
      const henDay = isFresh ? kept : await houseHenDay(layout, day, at, engine);
      engine.henDay = henDay;
      if (henDay.candidate) candidates.push(henDay.candidate);
    }
    return { day, candidates, openAt, recent };
  }

  /** The house-dip judgement of the last complete day (kept in the engine state between evaluations). */
  async function houseHenDay(
    layout: Layout,
    day: string,
    at: Date,
    engine: EngineState,
  ): Promise<NonNullable<EngineState['henDay']>> {
    const { house } = layout;
    const yesterday = addDays(day, -1);
    const base = { day: yesterday, completeDay: engine.completeDay, at: at.getTime() };
    // A part day — the house's readings stopped before its lights-off (a late or quiet gateway) — is data
    // late, not a dip.
    if (engine.lateDay === yesterday) return { ...base, candidate: null };
    const sectionIds = layout.sections.map((s) => s.id);
    const hens = await hensAlive(db, house.id, addDays(day, -8), yesterday);
    const dayEggs = await sectionDays(db, house.farmId, sectionIds, addDays(day, -8), yesterday);
    const hdp = (d: string) => {
      const h = hens.get(d);
      // Yesterday as judged: a silent counter's eggs and a short row's or tier's missing eggs filled in,
      // so one cause raises one alarm (the counter, the row, the tier), not also a house dip.
      const e =
        d === yesterday && engine.completeDay === yesterday && engine.completeDayEggs
          ? engine.completeDayEggs
          : dayEggs.filter((r) => r.day === d).reduce((n, r) => n + r.eggs, 0);
      return h && e > 0 ? (e / h) * 100 : null;
    };
    const latest = hdp(yesterday);
    const previous = daysOf({ firstDay: addDays(day, -8), lastDay: addDays(day, -2) })
      .map(hdp)
      .filter((v): v is number => v !== null);
    if (latest === null) return { ...base, candidate: null };
    // The flock's own lay curve, when it fits well, knows about age; the 7-day average does not.
    const fromCurve = expectedLay ? await expectedLay.expectedHenDayPct(house.id, yesterday) : null;
    // Against the flock's own fitted curve (it knows about age, and a week-long drop does not become the
    // norm); without one, the judgement bench:detect measures: more than 5 % below its recent days' median
    // and far outside their wobble.
    const recentDays = judgeHouseDay(latest, [...previous].reverse());
    const dip =
      fromCurve !== null
        ? judgeHouseDipAgainstCurve(latest, fromCurve)
        : { average: recentDays.expected, isDip: recentDays.isDip };
    return {
      ...base,
      candidate: {
        kind: 'house_dip',
        scope: 'house',
        row: null,
        tier: null,
        isLearning: fromCurve === null && previous.length < MIN_CLEAN_DAYS,
        eggs: latest,
        expected: dip.average,
        ratio: latest / dip.average,
        pValue: 1,
        // A complete day is final: one evaluation is enough (the streak is primed below).
        isShort: dip.isDip,
        isRecovered: !dip.isDip,
      },
    };
  }

  /** Runs the candidates through their streaks and opens, updates and closes exceptions. */
  /**
   * Saves what an evaluation changes: the plan (libs/domain `planExceptionChanges`) decides which exceptions
   * open, close or are brought up to date; they, their audit entries and the spots' streaks are written in one
   * transaction, so a failed write leaves neither a half-applied evaluation nor streaks that disagree with it.
   */
  async function apply(
    layout: Layout,
    at: Date,
    day: string,
    candidates: Candidate[],
    streaks: Record<string, Streak>,
    /** the exceptions open at `at`, as measure() read them */
    openAt: ExceptionRow[],
    /** the exceptions of the last NORM_DAYS up to `at`, as measure() read them */
    recent: readonly ExceptionRow[],
    /** writes the streaks (and the engine's state) with the changes, in the same transaction */
    saveState: (tx: Queryable, streaks: Record<string, Streak>) => Promise<void>,
  ): Promise<ExceptionRow[]> {
    const { house } = layout;
    const plan = planExceptionChanges({
      at,
      day,
      dayStart: productionDayStart(day, house.timezone, house.lightsOn),
      findings: candidates,
      streaks,
      open: openAt.map(known),
      recent: recent.map(known),
    });
    const changed: ExceptionRow[] = [];
    // Most evaluations change no exception: then the streaks are the one write, and need no transaction
    // (this runs every few seconds per house, and at every checkpoint of a replay).
    if (
      plan.opens.length === 0 &&
      plan.closes.length === 0 &&
      plan.absorbs.length === 0 &&
      plan.updates.length === 0
    ) {
      await saveState(db, plan.streaks);
      Object.assign(streaks, plan.streaks);
      return changed;
    }
    await db.transaction(async (tx) => {
      for (const open of plan.opens) {
        const row = await openException(tx, {
          farmId: house.farmId,
          houseId: house.id,
          ...open,
          openedAt: at,
          openedDay: day,
          lastEvaluatedAt: at,
        });
        if (!row) continue;
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: null,
          action: 'exception.open',
          entity: 'exception',
          entityId: row.id,
          after: row,
        });
        changed.push(row);
      }
      const closing = [
        ...plan.closes.map((existing) => ({ existing, closeReason: 'recovered' as const })),
        ...plan.absorbs.map((existing) => ({ existing, closeReason: 'absorbed' as const })),
      ];
      for (const { existing, closeReason } of closing) {
        const row = await updateException(tx, house.farmId, existing.id, {
          status: 'closed',
          closedAt: at,
          closeReason,
          lastEvaluatedAt: at,
        });
        if (!row) continue;
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: null,
          action: 'exception.close',
          entity: 'exception',
          entityId: row.id,
          before: { status: existing.status },
          after: { status: 'closed', closeReason },
        });
        changed.push(row);
      }
      for (const { existing, figures, isVisible } of plan.updates) {
        const row = await updateException(tx, house.farmId, existing.id, {
          ...figures,
          lastEvaluatedAt: at,
        });
        // A person may have acknowledged it since it was read: that is news to the map too.
        if (row && (isVisible || row.status !== existing.status)) changed.push(row);
      }
      await saveState(tx, plan.streaks);
    });
    Object.assign(streaks, plan.streaks);
    return changed;
  }

  function announce(layout: Layout, changed: ExceptionRow[]): void {
    events.emit('house.evaluated', {
      farmId: layout.house.farmId,
      houseId: layout.house.id,
      changed,
    });
  }

  return {
    async evaluateNow(houseId, now = new Date()) {
      const layout = await baseline.layout(houseId);
      if (!layout) return { changed: [] };
      const { streaks, engine } = await readEvaluation(db, houseId);
      const { day, candidates, openAt, recent } = await measure(layout, now, true, engine);
      const changed = await apply(layout, now, day, candidates, streaks, openAt, recent, (tx, s) =>
        writeEvaluation(tx, houseId, s, engine, now),
      );
      announce(layout, changed);
      return { changed };
    },

    async evaluateHistory(houseId, firstDay, lastDay) {
      const layout = await houseLayout(db, houseId);
      if (!layout) return { changed: [] };
      const { house } = layout;
      const streaks: Record<string, Streak> = {};
      const changed: ExceptionRow[] = [];
      // Each section's newest reading, read once: a day or checkpoint after which the house has no data at
      // all is data late (judgeDue).
      const newest = await beltHorizons(db, house.farmId, house.id, new Date(0));
      // A replay that continues where the engine's last judged day ends carries its CUSUM on (a backfill that
      // arrives in several pieces finds a slow slide like one that arrives at once); otherwise the replayed
      // days are judged with their own CUSUM run, from before the first of them.
      const stored = await readEngine(db, houseId);
      const engine: EngineState =
        stored.completeDay === addDays(firstDay, -1)
          ? { ...stored }
          : { completeDay: addDays(firstDay, -1) };
      for (const day of daysOf({ firstDay, lastDay })) {
        const start = productionDayStart(day, house.timezone, house.lightsOn);
        const end = productionDayStart(addDays(day, 1), house.timezone, house.lightsOn);
        // The engine's own checkpoints (whole hours after lights-on: the rollups' grain), then the day's end.
        const checkpoints = CHECKPOINT_HOURS.map(
          (h) => new Date(start.getTime() + h * 3_600_000),
        ).concat(end);
        // Today's checkpoints that have passed are replayed too; the live evaluation carries on from there.
        for (const at of checkpoints.filter((checkpoint) => checkpoint.getTime() <= Date.now())) {
          const { candidates, openAt, recent } = await measure(layout, at, false, engine, newest);
          // A replay keeps the streaks in hand; the engine's state is written once, at its end.
          changed.push(
            ...(await apply(layout, at, day, candidates, streaks, openAt, recent, () =>
              Promise.resolve(),
            )),
          );
        }
      }
      // A replay up to today leaves the engine where the live evaluation carries on: the days and checkpoints
      // it judged, and each spot's CUSUM.
      if (lastDay >= productionDayOf(new Date(), house.timezone, house.lightsOn))
        await writeEngine(db, houseId, engine, new Date());
      announce(layout, changed);
      return { changed };
    },

    buildMap: (houseId, window, now) => houseMap.buildMap(houseId, window, now),
    cellDetail: (houseId, row, tier, now) => houseMap.cellDetail(houseId, row, tier, now),
  };
}
