import {
  CLEAR,
  eggsLost,
  findingKey,
  stepStreak,
  type ExceptionKind,
  type ExceptionScope,
  type Streak,
  type Verdict,
} from './shortfall';

/** One thing the engine measured in an evaluation: a spot's verdict, for the consecutive-evaluation rule. */
export interface EvaluationFinding extends Verdict {
  kind: ExceptionKind;
  scope: ExceptionScope;
  row: number | null;
  tier: number | null;
  isLearning: boolean;
  /** a judgement of a complete day or a fixed checkpoint: opens at once, never re-tested */
  isFinal?: boolean;
}

/** What the plan reads of an exception already stored. */
export interface KnownException {
  id: number;
  kind: ExceptionKind;
  scope: ExceptionScope;
  row: number | null;
  tier: number | null;
  eggs: number;
  worstRatio: number;
  lostByDay: Readonly<Record<string, number>>;
  isLearning: boolean;
  status: string;
  closeReason: string | null;
  openedAt: Date;
  closedAt: Date | null;
}

/** The figures an exception is opened with or brought up to date with. */
export interface ExceptionFigures {
  eggs: number;
  expected: number;
  ratio: number;
  pValue: number;
  worstRatio: number;
  eggsLost: number;
  lostByDay: Record<string, number>;
  isLearning: boolean;
}

export interface ExceptionPlan {
  /** every spot's streak after this evaluation, to be stored with it */
  streaks: Record<string, Streak>;
  /** new exceptions, opened at the evaluation's time */
  opens: (ExceptionFigures &
    Pick<EvaluationFinding, 'kind' | 'scope' | 'row' | 'tier'> & {
      /** the measurement it opened on, kept as it was */
      atOpen: Pick<Verdict, 'eggs' | 'expected' | 'ratio' | 'pValue'>;
    })[];
  /** open exceptions that recovered (closed as "recovered") */
  closes: KnownException[];
  /**
   * open section shortfalls now covered by an open shortfall of their row or tier (closed as "absorbed"):
   * one cause, one alarm, even when a section showed it first. Acknowledged ones stay: a person has them.
   */
  absorbs: KnownException[];
  /** open exceptions brought up to date; `isVisible` when a person would see a different count */
  updates: { existing: KnownException; figures: ExceptionFigures; isVisible: boolean }[];
}

/** The key of a spot's streak: its kind and where it is. */
export const streakKey = (f: Pick<EvaluationFinding, 'kind' | 'scope' | 'row' | 'tier'>) =>
  `${f.kind}|${findingKey(f)}`;

/**
 * What an evaluation changes, decided without touching storage: each finding steps its spot's streak
 * (opens after two short evaluations, closes after two recovered; a house dip or a final judgement that is
 * short opens at once); an open exception that stays open has its figures brought up to date. A spot a person
 * closed as normal for this spot since the day began does not reopen (its streak starts again). The service
 * gathers the numbers and saves the plan in one transaction.
 */
export function planExceptionChanges(input: {
  /** the evaluation's time and its production day (and that day's start) */
  at: Date;
  day: string;
  dayStart: Date;
  findings: readonly EvaluationFinding[];
  streaks: Readonly<Record<string, Streak>>;
  /** the exceptions open at `at` */
  open: readonly KnownException[];
  /** the exceptions of the last days, open or closed */
  recent: readonly KnownException[];
}): ExceptionPlan {
  const { at, day, dayStart } = input;
  const live = new Map(input.open.map((e) => [streakKey(e), e]));
  const recentlyNormal = new Set(
    input.recent
      .filter(
        (e) =>
          e.closeReason === 'normal_for_spot' &&
          e.openedAt <= at &&
          (e.closedAt === null || e.closedAt >= dayStart),
      )
      .map(streakKey),
  );
  const plan: ExceptionPlan = {
    streaks: { ...input.streaks },
    opens: [],
    closes: [],
    absorbs: [],
    updates: [],
  };
  for (const finding of input.findings) {
    const key = streakKey(finding);
    const existing = live.get(key);
    // What is stored says what is open; a person may have closed it since the last evaluation.
    const base: Streak = { ...(plan.streaks[key] ?? CLEAR), isOpen: existing !== undefined };
    const primed =
      (finding.kind === 'house_dip' || finding.isFinal) && finding.isShort && !base.isOpen
        ? { ...base, short: 1 }
        : base;
    const step = stepStreak(primed, finding);
    plan.streaks[key] = step.streak;
    const lostToday = finding.kind === 'shortfall' ? eggsLost(finding.expected, finding.eggs) : 0;
    if (step.change === 'open') {
      if (recentlyNormal.has(key)) {
        plan.streaks[key] = CLEAR;
        continue;
      }
      plan.opens.push({
        kind: finding.kind,
        scope: finding.scope,
        row: finding.row,
        tier: finding.tier,
        eggs: Math.round(finding.eggs),
        expected: finding.expected,
        ratio: finding.ratio,
        pValue: finding.pValue,
        worstRatio: finding.ratio,
        eggsLost: lostToday,
        lostByDay: { [day]: lostToday },
        isLearning: finding.isLearning,
        atOpen: {
          eggs: finding.eggs,
          expected: finding.expected,
          ratio: finding.ratio,
          pValue: finding.pValue,
        },
      });
    } else if (existing && step.change === 'close') {
      plan.closes.push(existing);
    } else if (existing) {
      const lostByDay = { ...existing.lostByDay };
      if (finding.kind === 'shortfall') lostByDay[day] = lostToday;
      const eggs = Math.round(finding.eggs);
      plan.updates.push({
        existing,
        figures: {
          eggs,
          expected: finding.expected,
          ratio: finding.ratio,
          pValue: finding.pValue,
          worstRatio: Math.min(existing.worstRatio, finding.ratio),
          lostByDay,
          eggsLost: Object.values(lostByDay).reduce((a, b) => a + b, 0),
          isLearning: existing.isLearning && finding.isLearning,
        },
        isVisible: eggs !== existing.eggs,
      });
    }
  }
  // Rows and tiers short after this evaluation absorb the open section shortfalls under them.
  const closed = new Set(plan.closes.map((e) => e.id));
  const wide = [...input.open.filter((e) => !closed.has(e.id)), ...plan.opens].filter(
    (e) => e.kind === 'shortfall' && (e.scope === 'row' || e.scope === 'tier'),
  );
  for (const e of input.open) {
    if (e.kind !== 'shortfall' || e.scope !== 'section' || e.status !== 'open' || closed.has(e.id))
      continue;
    const isCovered = wide.some((w) => (w.scope === 'row' ? w.row === e.row : w.tier === e.tier));
    if (!isCovered) continue;
    plan.absorbs.push(e);
    plan.streaks[streakKey(e)] = CLEAR;
    plan.updates = plan.updates.filter((u) => u.existing.id !== e.id);
  }
  return plan;
}
