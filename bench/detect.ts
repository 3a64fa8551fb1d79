/**
 * npm run bench:detect [-- --seeds 5 --weeks 2]
 *
 * The quality of Tierscope's exceptions, measured on simulated houses with real-world noise (the realistic
 * simulator: binomial counts, day-to-day section and house noise, persistent differences, lay-time offsets,
 * belt schedules, collector lag, glitches, late gateways) — never on tidy data. The pure engine from
 * libs/domain, exactly the functions the server calls, runs in-process over every house-day, 15 minutes at
 * a time, with the data a server would have by then. Beside it, on the same data, two yardsticks:
 *  (a) the rule a general-purpose monitoring stack would be set up with: alert when a section's running
 *      count today is 10 % below its tier median on two successive 15-minute evaluations;
 *  (b) an oracle that knows each section's true expected eggs and noise: a tabular CUSUM on complete days
 *      with the true parameters, its decision interval set so its false-alarm rate matches the engine's.
 * Prints, per fault kind, recall, median and p90 delay in laying hours from onset, and wrong-kind
 * attributions; false exceptions per house-week by kind; and the same for the yardsticks. The last line is
 * one JSON object. Not a test; CI does not run it.
 */
import { parseArgs } from 'node:util';
import {
  CHECKPOINT_HOURS,
  COMPLETE_DAY,
  dayHourRatios,
  byGridHour,
  judgeCollector,
  judgeHouseDay,
  judgeStage,
  median,
  pastDayOf,
  spotKeyOf,
  type CusumState,
  type PastDay,
  type SectionCounts,
  type StageJudgement,
  usualHourRatios,
  SlotSilenceWatch,
} from '@tierscope/domain';
import {
  RealisticHouse,
  SLOT_MINUTES,
  SLOTS_PER_DAY,
  type PlantedFault,
  type SimDay,
} from '../simulator/src/realistic';
import { generator, hashSeed } from '../simulator/src/random';

const { values } = parseArgs({
  options: {
    seeds: { type: 'string', default: '5' },
    weeks: { type: 'string', default: '2' },
    /** comma-separated fault kinds to run (all when absent): for working on one kind; targets need all */
    kinds: { type: 'string' },
  },
});
const SEEDS = Number(values.seeds);
const JUDGED_DAYS = Number(values.weeks) * 7;
const WARMUP_DAYS = 28;
const THRESHOLD_PCT = 10;
const PHOTOPERIOD_HOURS = 16;
const LIGHT_SLOTS = (PHOTOPERIOD_HOURS * 60) / SLOT_MINUTES;
const SIZES: [number, number][] = [
  [6, 3],
  [8, 3],
  [16, 3],
];

type FaultKind =
  | 'none'
  | 'section -10%'
  | 'section -15%'
  | 'section -20%'
  | 'row -10%'
  | 'row -12%'
  | 'row -15%'
  | 'tier -10%'
  | 'tier -12%'
  | 'tier -15%'
  | 'slide 1.5%/day'
  | 'dead counter'
  | 'over-counting counter'
  | 'collector drift'
  | 'late gateway'
  | 'structural end row'
  | 'section 30 min late';
const FAULT_KINDS: FaultKind[] = [
  'none',
  'section -10%',
  'section -15%',
  'section -20%',
  'row -10%',
  'row -12%',
  'row -15%',
  'tier -10%',
  'tier -12%',
  'tier -15%',
  'slide 1.5%/day',
  'dead counter',
  'over-counting counter',
  'collector drift',
  'late gateway',
  'structural end row',
  'section 30 min late',
];
const ONLY_KINDS = values.kinds ? new Set(values.kinds.split(',').map((k) => k.trim())) : null;
/** Kinds that are not faults: a good engine raises nothing for them. */
const NOT_FAULTS = new Set<FaultKind>(['none', 'structural end row', 'section 30 min late']);

interface Planted {
  kind: FaultKind;
  fault: PlantedFault | null;
  onsetSlot: number;
  row: number;
  tier: number;
}

type EventKind =
  'shortfall' | 'silent_counter' | 'collector_gap' | 'house_dip' | 'counter_high' | 'data_late';

interface Event {
  kind: EventKind;
  key: string;
  slot: number;
}

/** Plants one fault of a kind at a random place and time in the judged weeks. */
function plant(kind: FaultKind, rows: number, tiers: number, seed: number): Planted {
  const random = generator(hashSeed(seed, 'plant', kind, rows));
  const row = 1 + Math.floor(random() * rows);
  const tier = 1 + Math.floor(random() * tiers);
  const day = WARMUP_DAYS + 2 + Math.floor(random() * 4);
  const onsetSlot = day * SLOTS_PER_DAY + Math.floor(random() * (LIGHT_SLOTS - 8));
  const at = { onsetSlot };
  const fault = ((): PlantedFault | null => {
    switch (kind) {
      case 'section -10%':
        return { kind: 'section', row, tier, drop: 0.1, ...at };
      case 'section -15%':
        return { kind: 'section', row, tier, drop: 0.15, ...at };
      case 'section -20%':
        return { kind: 'section', row, tier, drop: 0.2, ...at };
      case 'row -10%':
        return { kind: 'row', row, drop: 0.1, ...at };
      case 'row -12%':
        return { kind: 'row', row, drop: 0.12, ...at };
      case 'row -15%':
        return { kind: 'row', row, drop: 0.15, ...at };
      case 'tier -10%':
        return { kind: 'tier', tier, drop: 0.1, ...at };
      case 'tier -12%':
        return { kind: 'tier', tier, drop: 0.12, ...at };
      case 'tier -15%':
        return { kind: 'tier', tier, drop: 0.15, ...at };
      case 'slide 1.5%/day':
        return { kind: 'slide', row, tier, perDay: 0.015, ...at };
      case 'dead counter':
        return { kind: 'dead', row, tier, ...at };
      case 'over-counting counter':
        return { kind: 'overcount', row, tier, factor: 1.15, ...at };
      case 'collector drift':
        return { kind: 'collector-drift', pct: 4, ...at };
      case 'late gateway':
        return { kind: 'late-gateway', hours: 4, ...at };
      case 'structural end row':
        return { kind: 'end-row', row: random() < 0.5 ? 1 : rows, factor: 0.92 };
      case 'section 30 min late':
        return { kind: 'late-section', row, tier, minutes: 30 };
      default:
        return null;
    }
  })();
  return { kind, fault, onsetSlot, row, tier };
}

/** Whether an event is the planted fault found (correct), at the fault but of the wrong kind, or false. */
function classify(event: Event, planted: Planted): 'correct' | 'wrong' | 'false' {
  if (NOT_FAULTS.has(planted.kind) || event.slot < planted.onsetSlot) return 'false';
  const [scope, r, t] = event.key.split(':');
  const row = Number(r);
  const tier = Number(t);
  const isSection = scope === 'section' && row === planted.row && tier === planted.tier;
  const isRowOf = scope === 'row' && row === planted.row;
  const isTierOf = scope === 'tier' && tier === planted.tier;
  switch (planted.kind) {
    case 'section -10%':
    case 'section -15%':
    case 'section -20%':
    case 'slide 1.5%/day':
      if (event.kind === 'shortfall' && isSection) return 'correct';
      return event.kind === 'shortfall' && (isRowOf || isTierOf) ? 'wrong' : 'false';
    case 'row -10%':
    case 'row -12%':
    case 'row -15%':
      if (event.kind === 'shortfall' && isRowOf) return 'correct';
      return event.kind === 'shortfall' && scope === 'section' && row === planted.row
        ? 'wrong'
        : event.kind === 'house_dip'
          ? 'wrong'
          : 'false';
    case 'tier -10%':
    case 'tier -12%':
    case 'tier -15%':
      if (event.kind === 'shortfall' && isTierOf) return 'correct';
      return (event.kind === 'shortfall' && scope === 'section' && tier === planted.tier) ||
        event.kind === 'house_dip'
        ? 'wrong'
        : 'false';
    case 'dead counter':
      if (event.kind === 'silent_counter' && isSection) return 'correct';
      return isSection ||
        isRowOf ||
        isTierOf ||
        event.kind === 'collector_gap' ||
        event.kind === 'house_dip'
        ? 'wrong'
        : 'false';
    case 'over-counting counter':
      if ((event.kind === 'counter_high' && isSection) || event.kind === 'collector_gap')
        return 'correct';
      return isSection || isRowOf || isTierOf ? 'wrong' : 'false';
    case 'collector drift':
      return event.kind === 'collector_gap'
        ? 'correct'
        : event.kind === 'house_dip'
          ? 'wrong'
          : 'false';
    case 'late gateway':
      if (event.kind === 'data_late') return 'correct';
      // Anything raised while its data was late is a wrong reading of lateness.
      return event.slot < planted.onsetSlot + 6 * 4 ? 'wrong' : 'false';
    default:
      return 'false';
  }
}

/**
 * The yardsticks alert on sections only and know no kinds: an alert on a section the fault makes lay (or
 * count) less is the fault found; anything else is a false alert.
 */
function classifyAffected(event: Event, planted: Planted): 'correct' | 'false' {
  if (NOT_FAULTS.has(planted.kind) || event.slot < planted.onsetSlot) return 'false';
  const [, r, t] = event.key.split(':');
  const row = Number(r);
  const tier = Number(t);
  const fault = planted.fault;
  if (!fault) return 'false';
  switch (fault.kind) {
    case 'section':
    case 'slide':
    case 'dead':
      return row === fault.row && tier === fault.tier ? 'correct' : 'false';
    case 'row':
      return row === fault.row ? 'correct' : 'false';
    case 'tier':
      return tier === fault.tier ? 'correct' : 'false';
    default:
      return 'false';
  }
}

/** Laying hours (hours of light) between two absolute slots. */
function layingHours(from: number, to: number): number {
  let slots = 0;
  for (let s = from; s < to; s++) if (s % SLOTS_PER_DAY < LIGHT_SLOTS) slots += 1;
  return (slots * SLOT_MINUTES) / 60;
}

/**
 * The laying time between a fault's onset and an alarm: the hours of each day's laying window (the slots
 * between the first 5 % and the last 5 % of the section's eggs of that day, as its hens laid them) that
 * passed between the two. A counter that dies in the afternoon tail, or during the dark, has little to miss
 * until its hens lay again; a dead counter's target ("found within 45 min of laying time") is counted so.
 */
function layingWindowHours(house: RealisticHouse, planted: Planted, to: number): number {
  let slots = 0;
  for (let d = Math.floor(planted.onsetSlot / SLOTS_PER_DAY); d * SLOTS_PER_DAY < to; d++) {
    const section = house
      .dayData(d)
      .sections.find((x) => x.row === planted.row && x.tier === planted.tier);
    const laid = section?.laid ?? new Int32Array(SLOTS_PER_DAY);
    const total = laid.reduce((n, v) => n + v, 0);
    let sum = 0;
    for (let k = 0; k < SLOTS_PER_DAY; k++) {
      const before = sum;
      sum += laid[k] ?? 0;
      const slot = d * SLOTS_PER_DAY + k;
      if (slot < planted.onsetSlot || slot >= to) continue;
      if (sum > 0.05 * total && before < 0.95 * total) slots += 1;
    }
  }
  return (slots * SLOT_MINUTES) / 60;
}

/** Belts that run only at set times (hours after lights-on) on every third seed; else belts that always run. */
function beltRunHoursOf(seed: number): number[] | undefined {
  return seed % 3 === 0 ? [1.5, 3, 4.5, 6, 8, 10, 13, 16] : undefined;
}

/**
 * The first slot at or after a dead counter's onset in which it would have counted eggs: the next egg laid on
 * running belts; on scheduled ones the next run that carries eggs (laid since the run before it) once the
 * section's laying window has opened — a run carrying only the day's first eggs shows nothing either way.
 */
function firstMissedCount(
  house: RealisticHouse,
  planted: Planted,
  runHours: readonly number[] | undefined,
): number {
  const runs = runHours
    ? new Set(runHours.map((h) => Math.min(SLOTS_PER_DAY - 1, Math.round((h * 60) / SLOT_MINUTES))))
    : null;
  const isDelivery = (k: number) => !runs || runs.has(k) || k === SLOTS_PER_DAY - 1;
  const laidAt = (slot: number) =>
    house
      .dayData(Math.floor(slot / SLOTS_PER_DAY))
      .sections.find((x) => x.row === planted.row && x.tier === planted.tier)?.laid[
      slot % SLOTS_PER_DAY
    ] ?? 0;
  // Eggs on the belt at the onset: laid since the last delivery before it.
  let held = 0;
  for (let slot = planted.onsetSlot - 1; slot >= 0 && !isDelivery(slot % SLOTS_PER_DAY); slot--)
    held += laidAt(slot);
  const windowOpens = (day: number) => {
    const laid = Array.from(
      house.dayData(day).sections.find((x) => x.row === planted.row && x.tier === planted.tier)
        ?.laid ?? [],
    );
    const total = laid.reduce((a, b) => a + b, 0);
    let sum = 0;
    let k = 0;
    while (k < SLOTS_PER_DAY - 1 && (sum += laid[k] ?? 0) <= 0.05 * total) k++;
    return day * SLOTS_PER_DAY + k;
  };
  for (let slot = planted.onsetSlot; ; slot++) {
    held += laidAt(slot);
    if (isDelivery(slot % SLOTS_PER_DAY)) {
      if (held > 0 && (!runs || slot >= windowOpens(Math.floor(slot / SLOTS_PER_DAY)))) return slot;
      held = 0;
    }
  }
}

/** Cumulative counts by stage of a simulated day, from the slots known (`knownSlots` of the day). */
function countsOf(day: SimDay, knownSlots: number): SectionCounts[] {
  const stageEnds = [...CHECKPOINT_HOURS.map((h) => (h * 60) / SLOT_MINUTES), SLOTS_PER_DAY];
  return day.sections.map((s) => {
    const byStage: number[] = [];
    let sum = 0;
    let slot = 0;
    for (const end of stageEnds) {
      for (; slot < Math.min(end, knownSlots); slot++) sum += s.counted[slot] ?? 0;
      byStage.push(sum);
    }
    return { row: s.row, tier: s.tier, byStage };
  });
}

interface HouseResult {
  events: Event[];
  naive: Event[];
  /** per section: the oracle's standardised daily residuals over the judged days */
  oracleSeries: Map<string, { slot: number; u: number }[]>;
}

/** The spot DETECT_DEBUG follows: the planted row or tier, else its section. */
function debugKeyOf(planted: Planted): string {
  if (planted.kind.startsWith('row')) return spotKeyOf('row', planted.row, null);
  if (planted.kind.startsWith('tier')) return spotKeyOf('tier', null, planted.tier);
  return spotKeyOf('section', planted.row, planted.tier);
}

/** Runs the engine over a house, as the server would: every 15 minutes, with the data that has arrived. */
function runEngine(house: RealisticHouse, planted: Planted, totalDays: number): HouseResult {
  const events: Event[] = [];
  const naive: Event[] = [];
  const oracleSeries = new Map<string, { slot: number; u: number }[]>();
  const past: PastDay[] = [];
  const open = new Map<string, { kind: EventKind; recovered: number }>();
  let cusum = new Map<string, CusumState>();
  let pending = new Map<string, number>();
  const silence = new SlotSilenceWatch(house.dayData(0).sections, totalDays * SLOTS_PER_DAY, {
    minutes: SLOT_MINUTES,
    perDay: SLOTS_PER_DAY,
    light: LIGHT_SLOTS,
  });
  const collectorPast: number[] = [];
  const henDayPast: number[] = [];
  const naiveState = new Map<string, { shortRuns: number; isAlerting: boolean }>();
  let lastCollectorBelts: { collector: number; belts: number } | null = null;
  const highYesterday = new Set<string>();

  const raise = (kind: EventKind, key: string, slot: number) => {
    const id = `${kind}|${key}`;
    if (open.has(id)) return;
    open.set(id, { kind, recovered: 0 });
    if (slot >= WARMUP_DAYS * SLOTS_PER_DAY) events.push({ kind, key, slot });
  };
  const settle = (kind: EventKind, key: string, isRecovered: boolean, needed = 2) => {
    const id = `${kind}|${key}`;
    const state = open.get(id);
    if (!state) return;
    state.recovered = isRecovered ? state.recovered + 1 : 0;
    if (state.recovered >= needed) open.delete(id);
  };
  const openKeys = (kind: EventKind) =>
    new Set(
      [...open.keys()]
        .filter((id) => id.startsWith(`${kind}|`))
        .map((id) => id.slice(kind.length + 1)),
    );

  const applyShortfalls = (judged: StageJudgement, slot: number, isCompleteDay = false) => {
    for (const spot of judged.short) raise('shortfall', spot.key, slot);
    // A counter reading high opens after two complete days in a row.
    for (const spot of judged.high) {
      if (highYesterday.has(spot.key)) raise('counter_high', spot.key, slot);
    }
    if (isCompleteDay) {
      highYesterday.clear();
      for (const spot of judged.high) highYesterday.add(spot.key);
    }
    for (const id of [...open.keys()]) {
      const [kind, key] = id.split('|') as [EventKind, string];
      const spot = judged.spots.get(key);
      if (!spot) continue;
      if (kind === 'shortfall') settle(kind, key, spot.isRecovered);
      if (kind === 'counter_high') settle(kind, key, spot.ratio <= 1 + THRESHOLD_PCT / 200);
    }
  };

  for (let d = 0; d < totalDays; d++) {
    const day = house.dayData(d);
    const dayStart = d * SLOTS_PER_DAY;
    const baselineOf = (key: string) => {
      const values: number[] = [];
      for (const p of past.slice(0, 28)) {
        const v = p.logRatios[COMPLETE_DAY]?.get(key);
        if (v !== undefined && !p.excluded.has(key)) values.push(v);
      }
      return values.length ? median(values) : 0;
    };
    const baselines = new Map(
      day.sections.map((s) => [
        spotKeyOf('section', s.row, s.tier),
        baselineOf(spotKeyOf('section', s.row, s.tier)),
      ]),
    );
    // Each section's usual count by each grid hour against its peers' (its usual laying time).
    const hourRatios = new Map(
      day.sections.map((s) => {
        const key = spotKeyOf('section', s.row, s.tier);
        return [key, usualHourRatios(past, key)];
      }),
    );
    const stageSlots = CHECKPOINT_HOURS.map((h) => (h * 60) / SLOT_MINUTES);
    const judgedStages = new Set<number>();
    const excludedToday = new Set<string>();
    let processed = 0;
    for (let j = 0; j < SLOTS_PER_DAY; j++) {
      const now = dayStart + j + 1;
      // What has arrived by now: every slot up to the first one still held back by a late gateway.
      let known = 0;
      while (known <= j && house.arrivalSlot(dayStart + known) <= now - 1) known++;
      const isLight = j < LIGHT_SLOTS;
      if (isLight && known < j + 1 - 3 && j >= 4) raise('data_late', 'house:-:-', now);
      else if (known >= j + 1) settle('data_late', 'house:-:-', true, 1);

      // Silent counters, slot by slot as the data arrives: zero since its last egg where its tier peers'
      // eggs since then say many were due (and, in the first hours, its usual count by this hour).
      for (; processed < known; processed++) {
        const k = processed;
        const results = silence.step(
          dayStart + k,
          day.sections.map((s) => s.counted[k] ?? 0),
          {
            baselineLogRatio: (key) => baselines.get(key) ?? 0,
            usualRatios: (key) => hourRatios.get(key) ?? [],
          },
        );
        for (const { key, counted, verdict } of results) {
          if (counted) settle('silent_counter', key, true, 1);
          if (!verdict?.isSilent) continue;
          if (process.env['DETECT_SILENT'] && !open.has(`silent_counter|${key}`))
            console.log(
              `silent ${house.rows}x${house.tiers} ${planted.kind} ${key} day ${d} slot ${k} due ${verdict.due.toFixed(1)}`,
            );
          raise('silent_counter', key, dayStart + k + 1);
        }
      }

      // The yardstick rule, every 15 minutes of light after the first hour.
      if (isLight && j >= 4) {
        const running = day.sections.map((s) => {
          let sum = 0;
          for (let k = 0; k < known; k++) sum += s.counted[k] ?? 0;
          return { s, sum };
        });
        for (const { s, sum } of running) {
          const key = spotKeyOf('section', s.row, s.tier);
          const tierMedian = median(running.filter((x) => x.s.tier === s.tier).map((x) => x.sum));
          const state = naiveState.get(key) ?? { shortRuns: 0, isAlerting: false };
          const isShort = tierMedian > 0 && sum < 0.9 * tierMedian;
          state.shortRuns = isShort ? state.shortRuns + 1 : 0;
          if (state.shortRuns >= 2 && !state.isAlerting) {
            state.isAlerting = true;
            if (now >= WARMUP_DAYS * SLOTS_PER_DAY)
              naive.push({ kind: 'shortfall', key, slot: now });
          }
          if (!isShort) state.isAlerting = false;
          naiveState.set(key, state);
        }
      }

      // Checkpoints, once each, when their data is in.
      for (let c = 0; c < stageSlots.length; c++) {
        if (judgedStages.has(c) || known < (stageSlots[c] ?? 0)) continue;
        judgedStages.add(c);
        const judged = judgeStage({
          thresholdPct: THRESHOLD_PCT,
          stage: c,
          sections: countsOf(day, known),
          past,
          silent: openKeys('silent_counter'),
          open: openKeys('shortfall'),
          pending,
        });
        pending = judged.pending;
        if (process.env['DETECT_DEBUG'] === planted.kind && d >= WARMUP_DAYS) {
          const spot = judged.spots.get(debugKeyOf(planted));
          console.log(
            `  day ${d} checkpoint ${c}`,
            spot
              ? `${spot.eggs} ${spot.expected.toFixed(0)} z ${spot.z.toFixed(2)} ${spot.isShort}`
              : 'no spot',
            JSON.stringify([...judged.pending]),
          );
        }
        applyShortfalls(judged, now);
      }
      for (const id of open.keys()) excludedToday.add(id.split('|')[1] ?? '');
    }

    // Slots still held back at the day's end arrive with the next day's data: counted, not judged.
    for (; processed < SLOTS_PER_DAY; processed++) {
      const k = processed;
      silence.step(
        dayStart + k,
        day.sections.map((s) => s.counted[k] ?? 0),
      );
    }

    // The complete day (its data is in by the day's end in every planted case).
    const sections = countsOf(day, SLOTS_PER_DAY);
    const silentNow = openKeys('silent_counter');
    const judged = judgeStage({
      thresholdPct: THRESHOLD_PCT,
      stage: COMPLETE_DAY,
      sections,
      past,
      silent: silentNow,
      open: openKeys('shortfall'),
      cusum,
      pending,
    });
    cusum = judged.cusum;
    pending = judged.pending;
    const endSlot = dayStart + SLOTS_PER_DAY;
    if (process.env['DETECT_DEBUG'] === planted.kind && d >= WARMUP_DAYS) {
      const spot = judged.spots.get(debugKeyOf(planted));
      console.log(
        '  day',
        d,
        spot
          ? `${spot.eggs} ${spot.expected.toFixed(0)} ${spot.z.toFixed(2)} ${spot.isShort} w=${spot.wobble.toFixed(4)} S=${JSON.stringify(cusum.get(spot.key))}`
          : 'no spot',
        [...open.keys()].join(' '),
        'silent',
        [...silentNow].join(' '),
      );
    }
    applyShortfalls(judged, endSlot, true);

    // Collector against belts (silent sections filled in), over the last two complete days.
    const collector = day.collector.reduce((a, b) => a + b, 0);
    const belts = judged.houseEggs;
    if (lastCollectorBelts) {
      const c2 = collector + lastCollectorBelts.collector;
      const b2 = belts + lastCollectorBelts.belts;
      const gap = judgeCollector(c2, b2, collectorPast);
      if (gap.isGap) raise('collector_gap', 'house:-:-', endSlot);
      else settle('collector_gap', 'house:-:-', gap.isRecovered);
      if (!gap.isGap) collectorPast.unshift(Math.log(c2 / b2));
    }
    lastCollectorBelts = { collector, belts };

    // The house's day: from the belts with silent and short spots filled in.
    const hens = house.rows * house.tiers * 860;
    const henDay = (judged.houseEggsFilled / hens) * 100;
    const dip = judgeHouseDay(henDay, henDayPast);
    if (dip.isDip) raise('house_dip', 'house:-:-', endSlot);
    else settle('house_dip', 'house:-:-', dip.isRecovered);
    henDayPast.unshift(henDay);

    // The oracle's residuals: true expected eggs and true noise (section noise and binomial counting).
    for (const s of day.sections) {
      const key = spotKeyOf('section', s.row, s.tier);
      const counted = s.counted.reduce((a, b) => a + b, 0);
      const laidExpected = s.expectedWithoutFault;
      const sigma = Math.sqrt(0.025 ** 2 + 0.01 ** 2 + 1 / Math.max(1, laidExpected));
      const u = Math.log(Math.max(counted, 1) / laidExpected) / sigma;
      const list = oracleSeries.get(key) ?? [];
      if (d >= WARMUP_DAYS) list.push({ slot: endSlot, u });
      oracleSeries.set(key, list);
    }

    const excluded = new Set(excludedToday);
    for (const id of open.keys()) excluded.add(id.split('|')[1] ?? '');
    // Each section's count by each grid hour against its peers', from the hourly counts a server's rollups hold.
    const ratiosToday = dayHourRatios(
      day.sections.map((s) => ({
        row: s.row,
        tier: s.tier,
        byHour: byGridHour(s.counted, SLOT_MINUTES),
      })),
    );
    past.unshift(pastDayOf(`d${d}`, sections, excluded, new Map(), ratiosToday));
    if (past.length > 60) past.pop();
  }
  return { events, naive, oracleSeries };
}

/** The oracle's CUSUM over every section's residuals, with the tuned k and decision interval h. */
function oracleEvents(series: Map<string, { slot: number; u: number }[]>, h: number): Event[] {
  // Tuned for a 10 % drop: k is half the shift in σ units (σ ≈ 3 %).
  const k = 0.5 * (Math.log(1 / 0.9) / Math.sqrt(0.025 ** 2 + 0.01 ** 2 + 1 / 800));
  const events: Event[] = [];
  for (const [key, list] of series) {
    let s = 0;
    for (const { slot, u } of list) {
      s = Math.min(0, s + u + k);
      if (s < -h) {
        events.push({ kind: 'shortfall', key, slot });
        s = 0;
      }
    }
  }
  return events;
}

interface Tally {
  houses: number;
  found: number;
  delays: number[];
  wrong: number;
}

function percentile(values: number[], p: number): number | null {
  if (values.length === 0) return null;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? null;
}

const round1 = (v: number | null) => (v === null ? null : Math.round(v * 10) / 10);

function main(): void {
  const started = Date.now();
  const runs: { planted: Planted; result: HouseResult; size: string }[] = [];
  const deadMissedShare: number[] = [];
  const deadLayingDelays: number[] = [];
  for (const [rows, tiers] of SIZES) {
    for (const kind of FAULT_KINDS.filter((k) => !ONLY_KINDS || ONLY_KINDS.has(k))) {
      for (let seed = 1; seed <= SEEDS; seed++) {
        const houseSeed = hashSeed(rows, tiers, kind, seed);
        const planted = plant(kind, rows, tiers, houseSeed);
        const house = new RealisticHouse({
          rows,
          tiers,
          seed: houseSeed,
          breed: seed % 2 === 0 ? 'brown' : 'white',
          photoperiodHours: PHOTOPERIOD_HOURS,
          beltRunHours: beltRunHoursOf(seed),
          faults: planted.fault ? [planted.fault] : [],
        });
        const result = runEngine(house, planted, WARMUP_DAYS + JUDGED_DAYS);
        if (process.env['DETECT_DEBUG'] === kind) {
          console.log(
            `${rows}×${tiers} ${kind} at ${planted.row}:${planted.tier} onset day ${Math.floor(planted.onsetSlot / SLOTS_PER_DAY)} slot ${planted.onsetSlot % SLOTS_PER_DAY}`,
          );
          for (const e of result.events)
            console.log(
              '   ',
              e.kind,
              e.key,
              'day',
              Math.floor(e.slot / SLOTS_PER_DAY),
              'slot',
              e.slot % SLOTS_PER_DAY,
              classify(e, planted),
            );
        }
        // A dead counter: the eggs its section laid between the onset and the alarm, as a share of a day's —
        // how much went uncounted before anyone was told (time alone says little when few eggs are due).
        if (kind === 'dead counter') {
          const found = result.events.find(
            (e) =>
              e.kind === 'silent_counter' &&
              e.key === spotKeyOf('section', planted.row, planted.tier) &&
              e.slot >= planted.onsetSlot,
          );
          // Measured from the first count it missed: no data can show a dead counter before that (on belts
          // that run at set times, the first run after it died).
          const missedFrom = {
            ...planted,
            onsetSlot: firstMissedCount(house, planted, beltRunHoursOf(seed)),
          };
          const windowHours = found
            ? layingWindowHours(house, missedFrom, found.slot)
            : Number.POSITIVE_INFINITY;
          deadLayingDelays.push(windowHours);
          if (process.env['DETECT_DEAD'])
            console.log(
              `dead ${rows}x${tiers} seed ${seed} belts ${seed % 3 === 0 ? 'scheduled' : 'continuous'} ${seed % 2 === 0 ? 'brown' : 'white'} at ${planted.row}:${planted.tier} onset slot ${planted.onsetSlot % SLOTS_PER_DAY}` +
                ` found ${found ? `${found.slot - planted.onsetSlot} slots later (day slot ${found.slot % SLOTS_PER_DAY}), window ${windowHours} h from the first missed count` : 'never'}`,
            );
          if (found) {
            let missed = 0;
            let daily = 0;
            for (let slot = planted.onsetSlot; slot < found.slot; slot++) {
              const simDay = house.dayData(Math.floor(slot / SLOTS_PER_DAY));
              const section = simDay.sections.find(
                (x) => x.row === planted.row && x.tier === planted.tier,
              );
              missed += section?.laid[slot % SLOTS_PER_DAY] ?? 0;
              daily = section?.expectedWithoutFault ?? daily;
            }
            if (daily > 0) deadMissedShare.push(missed / daily);
          }
        }
        runs.push({ planted, result, size: `${rows}×${tiers}` });
      }
    }
  }
  const houseWeeks = (runs.length * JUDGED_DAYS) / 7;

  const score = (
    eventsOf: (r: (typeof runs)[number]) => Event[],
    judge: (event: Event, planted: Planted) => 'correct' | 'wrong' | 'false' = classify,
  ) => {
    const byFault = new Map<FaultKind, Tally>();
    const falseByKind = new Map<string, number>();
    for (const run of runs) {
      const tally = byFault.get(run.planted.kind) ?? { houses: 0, found: 0, delays: [], wrong: 0 };
      tally.houses += 1;
      let firstCorrect: number | null = null;
      for (const event of eventsOf(run)) {
        const verdict = judge(event, run.planted);
        if (verdict === 'correct') firstCorrect = Math.min(firstCorrect ?? Infinity, event.slot);
        else if (verdict === 'wrong') tally.wrong += 1;
        else {
          falseByKind.set(event.kind, (falseByKind.get(event.kind) ?? 0) + 1);
          if (process.env['DETECT_FALSE'] && judge === classify) {
            console.log(
              `false: ${run.size} ${run.planted.kind} ${event.kind} ${event.key} day ${Math.floor(event.slot / SLOTS_PER_DAY)} slot ${event.slot % SLOTS_PER_DAY}`,
            );
          }
        }
      }
      if (firstCorrect !== null) {
        tally.found += 1;
        tally.delays.push(layingHours(run.planted.onsetSlot, firstCorrect));
      }
      byFault.set(run.planted.kind, tally);
    }
    const falseTotal = [...falseByKind.values()].reduce((a, b) => a + b, 0);
    return { byFault, falseByKind, falsePerHouseWeek: falseTotal / houseWeeks };
  };

  const engine = score((r) => r.result.events);
  const naive = score((r) => r.result.naive, classifyAffected);
  // The oracle at the engine's false-alarm rate (or the lowest h that reaches it).
  let oracleH = 0.25;
  let oracle = score((r) => oracleEvents(r.result.oracleSeries, oracleH), classifyAffected);
  for (const h of [0.25, 0.5, 1, 1.5, 2, 3, 4, 5, 6, 8, 10, 12, 15]) {
    oracleH = h;
    oracle = score((r) => oracleEvents(r.result.oracleSeries, h), classifyAffected);
    if (oracle.falsePerHouseWeek <= Math.max(engine.falsePerHouseWeek, 0.02)) break;
  }

  console.log(
    `[bench] ${runs.length} houses (${SIZES.map(([r, t]) => `${r}×${t}`).join(', ')}), ${SEEDS} seeds a kind, ` +
      `${WARMUP_DAYS} days of history then ${JUDGED_DAYS} judged days: ${houseWeeks} house-weeks`,
  );
  console.log('');
  const header = [
    'fault',
    'recall',
    'median h',
    'p90 h',
    'wrong',
    '| naive recall',
    'naive med h',
    '| oracle recall',
    'oracle med h',
  ];
  console.log(header.map((h, i) => (i === 0 ? h.padEnd(24) : h.padStart(12))).join(''));
  const recall: Record<string, number> = {};
  const delay: Record<string, number | null> = {};
  for (const kind of FAULT_KINDS.filter((k) => !NOT_FAULTS.has(k))) {
    const e = engine.byFault.get(kind);
    const n = naive.byFault.get(kind);
    const o = oracle.byFault.get(kind);
    if (!e || !n || !o) continue;
    recall[kind] = e.found / e.houses;
    delay[kind] = round1(percentile(e.delays, 50));
    const cells = [
      kind,
      `${e.found}/${e.houses}`,
      String(round1(percentile(e.delays, 50)) ?? '–'),
      String(round1(percentile(e.delays, 90)) ?? '–'),
      String(e.wrong),
      `${n.found}/${n.houses}`,
      String(round1(percentile(n.delays, 50)) ?? '–'),
      `${o.found}/${o.houses}`,
      String(round1(percentile(o.delays, 50)) ?? '–'),
    ];
    console.log(cells.map((c, i) => (i === 0 ? c.padEnd(24) : c.padStart(12))).join(''));
  }
  console.log('');
  console.log(
    `false exceptions per house-week: engine ${engine.falsePerHouseWeek.toFixed(3)} ` +
      `(${JSON.stringify(Object.fromEntries(engine.falseByKind))}), naive ${naive.falsePerHouseWeek.toFixed(2)}, ` +
      `oracle ${oracle.falsePerHouseWeek.toFixed(3)} (h = ${oracleH})`,
  );
  const medianOf = (m: ReturnType<typeof score>) =>
    round1(
      percentile(
        [...m.byFault.values()].flatMap((t) => t.delays),
        50,
      ),
    );
  console.log(
    `median delay over every fault found: engine ${medianOf(engine)} h, naive ${medianOf(naive)} h, oracle ${medianOf(oracle)} h; ` +
      `${((Date.now() - started) / 1000).toFixed(1)} s`,
  );
  // The issue's targets, each measured here: the share of planted faults found within a delay (a fault not
  // found counts as late), in laying hours (PHOTOPERIOD_HOURS a production day).
  const within = (kinds: FaultKind[], hours: number, m: ReturnType<typeof score> = engine) => {
    const tallies = kinds.map((k) => m.byFault.get(k)).filter((t) => t !== undefined);
    const houses = tallies.reduce((n, t) => n + t.houses, 0);
    const inTime = tallies.reduce((n, t) => n + t.delays.filter((d) => d <= hours).length, 0);
    return houses ? inTime / houses : 0;
  };
  const day = PHOTOPERIOD_HOURS;
  const shortfallKinds = FAULT_KINDS.filter((k) => /^(section|row|tier|slide)/.test(k));
  const medianOver = (m: ReturnType<typeof score>, kinds: FaultKind[]) =>
    percentile(
      kinds.flatMap((k) => m.byFault.get(k)?.delays ?? []),
      50,
    ) ?? Number.NaN;
  const recallOf = (m: ReturnType<typeof score>) => {
    const tallies = [...m.byFault].filter(([k]) => !NOT_FAULTS.has(k)).map(([, t]) => t);
    return tallies.reduce((n, t) => n + t.found, 0) / tallies.reduce((n, t) => n + t.houses, 0);
  };
  // The same shares for the oracle (the best delay at the engine's false-alarm rate), as a yardstick.
  const oracleWithin: Record<string, number> = {
    dead_counter_within_45_min: within(['dead counter'], 0.75, oracle),
    section_15_within_2_days: within(['section -15%'], 2 * day, oracle),
    row_tier_12_within_2_days: within(['row -12%', 'tier -12%'], 2 * day, oracle),
    ten_pct_within_4_days: within(['section -10%', 'row -10%', 'tier -10%'], 4 * day, oracle),
    slide_before_15_pct: within(['slide 1.5%/day'], 10 * day, oracle),
  };
  const deadWithin45 =
    deadLayingDelays.filter((h) => h <= 0.75).length / Math.max(1, deadLayingDelays.length);
  const targets: Record<string, { value: number; target: string; met: boolean }> = {
    false_per_house_week: {
      value: engine.falsePerHouseWeek,
      target: '≤ 0.1',
      met: engine.falsePerHouseWeek <= 0.1,
    },
    // In laying time (the section's laying window) from the first count it missed: see layingWindowHours.
    dead_counter_within_45_min: {
      value: deadWithin45,
      target: '100 % (laying time)',
      met: deadWithin45 >= 1,
    },
    section_15_within_2_days: {
      value: within(['section -15%'], 2 * day),
      target: '≥ 95 %',
      met: within(['section -15%'], 2 * day) >= 0.95,
    },
    row_tier_12_within_2_days: {
      value: within(['row -12%', 'tier -12%'], 2 * day),
      target: '≥ 95 %',
      met: within(['row -12%', 'tier -12%'], 2 * day) >= 0.95,
    },
    ten_pct_within_4_days: {
      value: within(['section -10%', 'row -10%', 'tier -10%'], 4 * day),
      target: '≥ 90 %',
      met: within(['section -10%', 'row -10%', 'tier -10%'], 4 * day) >= 0.9,
    },
    slide_before_15_pct: {
      value: within(['slide 1.5%/day'], 10 * day),
      target: '100 % (−15 % after 10 days)',
      met: within(['slide 1.5%/day'], 10 * day) >= 1,
    },
    median_delay_vs_oracle: {
      value: medianOver(engine, shortfallKinds) / medianOver(oracle, shortfallKinds),
      target: '≤ 1.5 × (shortfall kinds)',
      met: medianOver(engine, shortfallKinds) <= 1.5 * medianOver(oracle, shortfallKinds),
    },
    ahead_of_general_rule: {
      value: recallOf(engine) - recallOf(naive),
      target: 'fewer false exceptions and no lower recall',
      met:
        engine.falsePerHouseWeek < naive.falsePerHouseWeek && recallOf(engine) >= recallOf(naive),
    },
  };
  console.log(
    `dead counters: laying time from the first missed count to the alarm (hours of the section's laying window, the central 90 % ` +
      `of its eggs): median ${round1(percentile(deadLayingDelays, 50))} h, p90 ${round1(percentile(deadLayingDelays, 90))} h, ` +
      `within 45 min ${(deadWithin45 * 100).toFixed(0)} %; in hours of light from death, within 45 min ` +
      `${(within(['dead counter'], 0.75) * 100).toFixed(0)} %`,
  );
  console.log(
    `dead counters: eggs laid but not counted before the alarm, as a share of the section's day: median ` +
      `${((percentile(deadMissedShare, 50) ?? 0) * 100).toFixed(1)} %, p90 ${((percentile(deadMissedShare, 90) ?? 0) * 100).toFixed(1)} %`,
  );
  console.log('');
  console.log('targets:');
  for (const [name, t] of Object.entries(targets))
    console.log(
      `  ${t.met ? '✓' : '✗'} ${name.padEnd(28)} ${t.value.toFixed(3).padStart(8)}  (${t.target})` +
        (name in oracleWithin ? `   oracle ${(oracleWithin[name] ?? 0).toFixed(3)}` : ''),
    );
  console.log(
    JSON.stringify({
      bench: 'detect',
      oracle_targets: Object.fromEntries(
        Object.entries(oracleWithin).map(([k, v]) => [k, Math.round(v * 1000) / 1000]),
      ),
      targets: Object.fromEntries(
        Object.entries(targets).map(([k, t]) => [
          k,
          { value: Math.round(t.value * 1000) / 1000, met: t.met },
        ]),
      ),
      house_weeks: houseWeeks,
      dead_counter_missed_share_median:
        Math.round((percentile(deadMissedShare, 50) ?? 0) * 1000) / 1000,
      dead_counter_laying_window_h: {
        median: round1(percentile(deadLayingDelays, 50)),
        p90: round1(percentile(deadLayingDelays, 90)),
      },
      false_per_house_week: Math.round(engine.falsePerHouseWeek * 1000) / 1000,
      false_by_kind: Object.fromEntries(engine.falseByKind),
      recall,
      delay_h: delay,
      naive: {
        false_per_house_week: Math.round(naive.falsePerHouseWeek * 100) / 100,
        recall: Object.fromEntries(
          [...naive.byFault]
            .filter(([k]) => !NOT_FAULTS.has(k))
            .map(([k, t]) => [k, t.found / t.houses]),
        ),
        median_delay_h: medianOf(naive),
      },
      oracle: {
        h: oracleH,
        false_per_house_week: Math.round(oracle.falsePerHouseWeek * 1000) / 1000,
        recall: Object.fromEntries(
          [...oracle.byFault]
            .filter(([k]) => !NOT_FAULTS.has(k))
            .map(([k, t]) => [k, t.found / t.houses]),
        ),
        median_delay_h: medianOf(oracle),
      },
    }),
  );
}

main();
