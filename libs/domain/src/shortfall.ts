import { median, normalUpperTail, poissonLowerTail } from './statistics';

/**
 * Tierscope's judgement of a house: which section, row or tier lays clearly less than its peers.
 * The 10 % default is the trade's rule of thumb (common practice, no published source — TRADE-FACTS.md);
 * the Poisson test keeps the thin counts of the first laying hours from raising alarms.
 */
export const SIGNIFICANCE = 0.01;
export const MIN_HISTORY_DAYS = 3;
export const BASELINE_DAYS = 7;

export const EXCEPTION_KINDS = [
  'shortfall',
  'silent_counter',
  'collector_gap',
  'house_dip',
] as const;
export type ExceptionKind = (typeof EXCEPTION_KINDS)[number];

/** Plain words for each kind, the same on every screen, mail and report. */
export const EXCEPTION_KIND_LABELS: Record<ExceptionKind, string> = {
  shortfall: 'Shortfall',
  silent_counter: 'Silent counter',
  collector_gap: 'Collector gap',
  house_dip: 'House dip',
};
export const EXCEPTION_SCOPES = ['section', 'row', 'tier', 'house'] as const;
export type ExceptionScope = (typeof EXCEPTION_SCOPES)[number];
export const EXCEPTION_STATUSES = ['open', 'acknowledged', 'closed'] as const;
export type ExceptionStatus = (typeof EXCEPTION_STATUSES)[number];
/** Reasons a person may close an exception with. */
export const PERSON_CLOSE_REASONS = ['normal_for_spot', 'fixed', 'false_alarm', 'other'] as const;
/**
 * Every way an exception ends: a person's reasons, and the engine's own — `recovered`, and `absorbed` (a
 * section's exception taken over by its row's or tier's).
 */
export const CLOSE_REASONS = ['recovered', 'absorbed', ...PERSON_CLOSE_REASONS] as const;
export type CloseReason = (typeof CLOSE_REASONS)[number];

/** A status in words, the same on every screen. */
export const EXCEPTION_STATUS_LABELS: Record<ExceptionStatus, string> = {
  open: 'Open',
  acknowledged: 'Acknowledged',
  closed: 'Closed',
};

/** Why it closed, in words. */
export const CLOSE_REASON_WORDS: Record<CloseReason, string> = {
  recovered: 'recovered by itself',
  absorbed: 'part of its row or tier exception',
  fixed: 'fixed',
  normal_for_spot: 'normal for this spot',
  false_alarm: 'false alarm',
  other: 'other',
};

export const sectionKey = (row: number, tier: number) => `${row}:${tier}`;

export interface Verdict {
  eggs: number;
  expected: number;
  /** eggs ÷ expected */
  ratio: number;
  /** one-sided Poisson P(X ≤ eggs | expected) */
  pValue: number;
  /** more than the threshold below expected, and not chance */
  isShort: boolean;
  /** back within half the threshold */
  isRecovered: boolean;
}

export function judge(eggs: number, expected: number, thresholdPct: number): Verdict {
  const ratio = expected > 0 ? eggs / expected : 1;
  const pValue = expected > 0 ? poissonLowerTail(eggs, expected) : 1;
  return {
    eggs,
    expected,
    ratio,
    pValue,
    isShort: ratio < 1 - thresholdPct / 100 && pValue < SIGNIFICANCE,
    isRecovered: ratio >= 1 - thresholdPct / 200,
  };
}

/** Consecutive-evaluation bookkeeping of one candidate exception. */
export interface Streak {
  short: number;
  recovered: number;
  isOpen: boolean;
}
export const CLEAR: Streak = { short: 0, recovered: 0, isOpen: false };

/** Opens after two consecutive short evaluations; closes after two consecutive recovered ones. */
export function stepStreak(streak: Streak, verdict: Pick<Verdict, 'isShort' | 'isRecovered'>) {
  if (!streak.isOpen) {
    const short = verdict.isShort ? streak.short + 1 : 0;
    return short >= 2
      ? { streak: { short: 0, recovered: 0, isOpen: true }, change: 'open' as const }
      : { streak: { ...streak, short }, change: null };
  }
  const recovered = verdict.isRecovered ? streak.recovered + 1 : 0;
  return recovered >= 2
    ? { streak: CLEAR, change: 'close' as const }
    : { streak: { ...streak, recovered }, change: null };
}

export interface SectionCount {
  row: number;
  tier: number;
  eggs: number;
  /** hens in the section, when counted */
  birds?: number | null;
}

export interface HistoryDay {
  day: string;
  sections: SectionCount[];
  /** sections (sectionKey) that had an open exception that day: not learned as normal */
  excluded: ReadonlySet<string>;
}

export interface HouseInput {
  rows: number;
  tiers: number;
  thresholdPct: number;
  /** the window being judged (today so far, or a complete day) */
  current: SectionCount[];
  /** previous complete days, any order; at most the last 7 are used */
  history: HistoryDay[];
  /** sections whose counter is silent: judged as a counter problem, not a shortfall */
  silent?: ReadonlySet<string>;
}

export interface Finding extends Verdict {
  kind: 'shortfall';
  scope: 'section' | 'row' | 'tier';
  row: number | null;
  tier: number | null;
  /** fewer than 3 days of history: shown, not e-mailed */
  isLearning: boolean;
}

export interface CellResult {
  row: number;
  tier: number;
  eggs: number | null;
  expected: number | null;
  ratio: number | null;
  pValue: number | null;
}

export interface HouseJudgement {
  cells: CellResult[];
  /** every candidate (short or not), for the consecutive-evaluation rule; keyed by findingKey */
  candidates: Finding[];
}

export const findingKey = (f: { scope: ExceptionScope; row: number | null; tier: number | null }) =>
  `${f.scope}:${f.row ?? '-'}:${f.tier ?? '-'}`;

const rateOf = (s: SectionCount, perHen: boolean) =>
  perHen && s.birds ? s.eggs / s.birds : s.eggs;

/** The section's usual ratio to its tier peers: median of its daily ratios, skipping excluded days; 1 without history. */
function baselineRatio(
  history: HistoryDay[],
  row: number,
  tier: number,
  perHen: boolean,
): { ratio: number; days: number } {
  const ratios: number[] = [];
  for (const day of history) {
    if (day.excluded.has(sectionKey(row, tier))) continue;
    const own = day.sections.find((s) => s.row === row && s.tier === tier);
    const peers = day.sections
      .filter((s) => s.tier === tier && s.row !== row)
      .map((s) => rateOf(s, perHen));
    const peerMedian = median(peers);
    if (own && peerMedian > 0) ratios.push(rateOf(own, perHen) / peerMedian);
  }
  return { ratio: ratios.length ? median(ratios) : 1, days: ratios.length };
}

function rowTotals(sections: SectionCount[]): Map<number, number> {
  const totals = new Map<number, number>();
  for (const s of sections) totals.set(s.row, (totals.get(s.row) ?? 0) + s.eggs);
  return totals;
}

function tierTotals(sections: SectionCount[]): Map<number, number> {
  const totals = new Map<number, number>();
  for (const s of sections) totals.set(s.tier, (totals.get(s.tier) ?? 0) + s.eggs);
  return totals;
}

/**
 * Judges every section against its tier peers, every row against the other rows, and every tier's share of
 * the house against its own recent share (never tier against tier: they differ by design and by where hens
 * choose to nest). A short row or tier absorbs the sections in it, and a silent counter is not a shortfall.
 */
export function judgeHouse(input: HouseInput): HouseJudgement {
  const history = [...input.history]
    .sort((a, b) => b.day.localeCompare(a.day))
    .slice(0, BASELINE_DAYS);
  const current = input.current;
  const silent = input.silent ?? new Set<string>();
  const cells: CellResult[] = [];
  const sectionCandidates: Finding[] = [];

  for (let row = 1; row <= input.rows; row++) {
    for (let tier = 1; tier <= input.tiers; tier++) {
      const own = current.find((s) => s.row === row && s.tier === tier);
      const tierSections = current.filter((s) => s.tier === tier);
      const perHen = tierSections.length > 0 && tierSections.every((s) => (s.birds ?? 0) > 0);
      const peers = tierSections.filter((s) => s.row !== row).map((s) => rateOf(s, perHen));
      if (!own || peers.length === 0) {
        cells.push({
          row,
          tier,
          eggs: own?.eggs ?? null,
          expected: null,
          ratio: null,
          pValue: null,
        });
        continue;
      }
      const baseline = baselineRatio(history, row, tier, perHen);
      const expected = median(peers) * baseline.ratio * (perHen ? (own.birds ?? 0) : 1);
      const verdict = judge(own.eggs, expected, input.thresholdPct);
      cells.push({
        row,
        tier,
        eggs: own.eggs,
        expected,
        ratio: verdict.ratio,
        pValue: verdict.pValue,
      });
      if (!silent.has(sectionKey(row, tier))) {
        sectionCandidates.push({
          kind: 'shortfall',
          scope: 'section',
          row,
          tier,
          isLearning: baseline.days < MIN_HISTORY_DAYS,
          ...verdict,
        });
      }
    }
  }

  // Rows against the other rows, with each row's own usual ratio.
  const rowCandidates: Finding[] = [];
  const totals = rowTotals(current);
  for (const [row, eggs] of totals) {
    const peers = [...totals].filter(([r]) => r !== row).map(([, e]) => e);
    if (peers.length === 0) continue;
    const ratios: number[] = [];
    for (const day of history) {
      const dayTotals = rowTotals(day.sections);
      const peerMedian = median([...dayTotals].filter(([r]) => r !== row).map(([, e]) => e));
      const own = dayTotals.get(row);
      const isExcluded = [...day.excluded].some((key) => key.startsWith(`${row}:`));
      if (!isExcluded && own !== undefined && peerMedian > 0) ratios.push(own / peerMedian);
    }
    const expected = median(peers) * (ratios.length ? median(ratios) : 1);
    rowCandidates.push({
      kind: 'shortfall',
      scope: 'row',
      row,
      tier: null,
      isLearning: ratios.length < MIN_HISTORY_DAYS,
      ...judge(eggs, expected, input.thresholdPct),
    });
  }

  // Each tier's share of the house against its own recent share.
  const tierCandidates: Finding[] = [];
  const houseTotal = current.reduce((n, s) => n + s.eggs, 0);
  for (const [tier, eggs] of tierTotals(current)) {
    const shares: number[] = [];
    for (const day of history) {
      const total = day.sections.reduce((n, s) => n + s.eggs, 0);
      const isExcluded = [...day.excluded].some((key) => key.endsWith(`:${tier}`));
      if (!isExcluded && total > 0) shares.push((tierTotals(day.sections).get(tier) ?? 0) / total);
    }
    // Without history there is no fair comparison for a tier: tiers differ by design.
    if (shares.length === 0 || houseTotal === 0) continue;
    tierCandidates.push({
      kind: 'shortfall',
      scope: 'tier',
      row: null,
      tier,
      isLearning: shares.length < MIN_HISTORY_DAYS,
      ...judge(eggs, median(shares) * houseTotal, input.thresholdPct),
    });
  }

  const shortRows = new Set(rowCandidates.filter((f) => f.isShort).map((f) => f.row));
  const shortTiers = new Set(tierCandidates.filter((f) => f.isShort).map((f) => f.tier));
  // A row or tier that holds a silent counter is short by that counter's missing eggs: a counter
  // problem, already its own exception, not a feed or light problem of the whole row or tier.
  const silentRows = new Set([...silent].map((key) => Number(key.split(':')[0])));
  const silentTiers = new Set([...silent].map((key) => Number(key.split(':')[1])));
  const candidates = [
    ...rowCandidates.filter((f) => !silentRows.has(f.row ?? 0)),
    ...tierCandidates.filter((f) => !silentTiers.has(f.tier ?? 0)),
    // A whole row (or tier) that is short is one exception, not one per section in it.
    ...sectionCandidates.filter((f) => !shortRows.has(f.row) && !shortTiers.has(f.tier)),
  ];
  return { cells, candidates };
}

/** What a cell's expected count is measured from: its tier peers, or its whole tier's usual share. */
export type CellYardstick = 'peers' | 'tier';

/** A whole tier as judged: its eggs against what its usual share of the house would be. */
export interface TierMeasure {
  tier: number;
  eggs: number;
  expected: number;
}

/**
 * A short tier hides in its cells: each cell is compared with its own tier's peers, which are short too, so
 * every cell of the tier reads about 100 %. The cells of the tiers given (those judged short, or under a tier
 * exception) are measured against the tier's own yardstick instead: each cell's expected count is scaled by
 * what the whole tier should have laid over what it did, so a tier at 89 % shows cells near 89 %. A short row
 * needs nothing of the kind: its cells are already compared with the other rows' cells of their tier.
 */
export function cellsAgainstShortTiers<C extends CellResult>(
  cells: readonly C[],
  shortTiers: readonly TierMeasure[],
  thresholdPct: number,
): (C & { yardstick: CellYardstick })[] {
  const factors = new Map(
    shortTiers
      .filter((t) => t.eggs > 0 && t.expected > t.eggs)
      .map((t) => [t.tier, t.expected / t.eggs]),
  );
  return cells.map((cell) => {
    const factor = factors.get(cell.tier);
    if (factor === undefined || cell.expected === null || cell.eggs === null)
      return { ...cell, yardstick: 'peers' as const };
    const verdict = judge(cell.eggs, cell.expected * factor, thresholdPct);
    return {
      ...cell,
      expected: verdict.expected,
      ratio: verdict.ratio,
      pValue: verdict.pValue,
      yardstick: 'tier' as const,
    };
  });
}

/** The collector and the sum of the belts disagree by more than `pct` %, by more than chance. */
export function judgeCollectorGap(collector: number, belts: number, pct = 3) {
  const diffPct = belts > 0 ? ((collector - belts) / belts) * 100 : 0;
  const z = collector + belts > 0 ? Math.abs(collector - belts) / Math.sqrt(collector + belts) : 0;
  const pValue = Math.min(1, 2 * normalUpperTail(z));
  return {
    diffPct,
    pValue,
    isGap: belts >= 500 && Math.abs(diffPct) > pct && pValue < SIGNIFICANCE,
  };
}

/**
 * Hen-day production more than 5 % below what the flock's own fitted lay curve expects at its age: used
 * instead of the 7-day average once the curve fits well, so a flock's normal rise or decline with age is
 * not mistaken for a dip (nor hides one).
 */
export function judgeHouseDipAgainstCurve(henDayPct: number, expectedPct: number, pct = 5) {
  return {
    average: expectedPct,
    isDip: expectedPct > 0 && henDayPct < expectedPct * (1 - pct / 100),
  };
}

/** Eggs lost: what was expected and not laid (never negative), and its value at a price per dozen. */
export function eggsLost(expected: number, eggs: number): number {
  return Math.max(0, Math.round(expected - eggs));
}
export function lostValue(eggs: number, pricePerDozen: number | null): number | null {
  return pricePerDozen === null ? null : Math.round((eggs / 12) * pricePerDozen * 100) / 100;
}

/** Where the crew should look first, from the exception's shape. */
export function likelyChecks(kind: ExceptionKind, scope: ExceptionScope): string[] {
  if (kind === 'silent_counter')
    return [
      'Egg counter on this belt (power, sensor, cable)',
      'Egg belt drive: is the belt moving?',
    ];
  if (kind === 'collector_gap')
    return ['Calibrate the collector counter', 'Check the belt counters against a hand count'];
  if (kind === 'house_dip')
    return [
      'Flock health walk',
      'Feed delivered and its quality',
      'House climate: temperature and ventilation',
      'Water use against yesterday',
    ];
  switch (scope) {
    case 'row':
      return [
        "This row's feed line (chain, hoppers, feed level)",
        "This row's water line (pressure, drinkers)",
      ];
    case 'tier':
      return ["This tier's lighting (lamps, dimming, schedule)", "This tier's feed loop"];
    default:
      return [
        'Drinkers in this section',
        'Feeders in this section',
        'Nests in this section (curtains, floor, dirt)',
        'The belt counter of this section',
      ];
  }
}
