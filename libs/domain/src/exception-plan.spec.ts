import { describe, expect, it } from 'vitest';
import {
  planExceptionChanges,
  streakKey,
  type EvaluationFinding,
  type KnownException,
} from './exception-plan';
import { CLEAR } from './shortfall';

const at = new Date('2026-11-10T12:00:00Z');
const dayStart = new Date('2026-11-10T05:00:00Z');
const day = '2026-11-10';

const short = (over: Partial<EvaluationFinding> = {}): EvaluationFinding => ({
  kind: 'shortfall',
  scope: 'row',
  row: 4,
  tier: null,
  isLearning: false,
  eggs: 820.4,
  expected: 1000,
  ratio: 0.8204,
  pValue: 1e-9,
  isShort: true,
  isRecovered: false,
  ...over,
});
const recovered = (over: Partial<EvaluationFinding> = {}) =>
  short({ eggs: 1000, ratio: 1, pValue: 0.5, isShort: false, isRecovered: true, ...over });

const stored = (over: Partial<KnownException> = {}): KnownException => ({
  id: 7,
  kind: 'shortfall',
  scope: 'row',
  row: 4,
  tier: null,
  eggs: 850,
  worstRatio: 0.85,
  lostByDay: { '2026-11-09': 150 },
  isLearning: false,
  status: 'open',
  closeReason: null,
  openedAt: new Date('2026-11-09T10:00:00Z'),
  closedAt: null,
  ...over,
});

const plan = (
  findings: EvaluationFinding[],
  streaks: Record<string, typeof CLEAR> = {},
  open: KnownException[] = [],
  recent: KnownException[] = [],
) => planExceptionChanges({ at, day, dayStart, findings, streaks, open, recent });

describe('planExceptionChanges', () => {
  it('opens a spot on its second short evaluation, with the figures it measured', () => {
    const first = plan([short()]);
    expect(first.opens).toEqual([]);
    const key = streakKey(short());
    expect(first.streaks[key]).toEqual({ short: 1, recovered: 0, isOpen: false });

    const second = plan([short()], first.streaks);
    expect(second.opens).toHaveLength(1);
    expect(second.opens[0]).toMatchObject({
      kind: 'shortfall',
      scope: 'row',
      row: 4,
      eggs: 820,
      worstRatio: 0.8204,
      eggsLost: 180,
      lostByDay: { [day]: 180 },
      atOpen: { eggs: 820.4 },
    });
    expect(second.streaks[key]?.isOpen).toBe(true);
  });

  it('opens a final judgement (a complete day) or a house dip at once', () => {
    expect(plan([short({ isFinal: true })]).opens).toHaveLength(1);
    const dip = short({ kind: 'house_dip', scope: 'house', row: null });
    const opened = plan([dip]).opens;
    expect(opened).toHaveLength(1);
    // Only shortfalls count eggs lost: a house dip's eggs are not one spot's loss.
    expect(opened[0]?.eggsLost).toBe(0);
  });

  it('does not reopen a spot a person closed as normal for it today, and starts its streak again', () => {
    const normal = stored({
      status: 'closed',
      closeReason: 'normal_for_spot',
      closedAt: new Date('2026-11-10T08:00:00Z'),
    });
    const result = plan([short({ isFinal: true })], {}, [], [normal]);
    expect(result.opens).toEqual([]);
    expect(result.streaks[streakKey(short())]).toEqual(CLEAR);
    // Closed as normal before this day began: no longer in the way.
    const older = stored({ ...normal, closedAt: new Date('2026-11-09T08:00:00Z') });
    expect(plan([short({ isFinal: true })], {}, [], [older]).opens).toHaveLength(1);
  });

  // Regression (issue 11, seen on the demo): a row fault coming on was confirmed first in one of its sections;
  // when the row opened, the section's exception stayed open beside it — two alarms for one cause.
  it('closes the open section shortfalls a row or tier opening now covers, as absorbed', () => {
    const section = stored({ id: 3, scope: 'section', row: 4, tier: 2 });
    const elsewhere = stored({ id: 4, scope: 'section', row: 5, tier: 2 });
    const handled = stored({ id: 5, scope: 'section', row: 4, tier: 1, status: 'acknowledged' });
    const sectionFinding = short({ scope: 'section', row: 4, tier: 2 });
    const result = plan([short({ isFinal: true }), sectionFinding], {}, [
      section,
      elsewhere,
      handled,
    ]);
    expect(result.opens.map((o) => `${o.scope} ${o.row}`)).toEqual(['row 4']);
    // The row's own section is absorbed; another row's stays, and so does one a person has in hand.
    expect(result.absorbs).toEqual([section]);
    expect(result.updates.map((u) => u.existing.id)).not.toContain(3);
    expect(result.streaks[streakKey(section)]).toEqual(CLEAR);
    // A tier already open absorbs a section of its tier the same way.
    const tier = stored({ id: 9, scope: 'tier', row: null, tier: 2 });
    expect(plan([], {}, [tier, elsewhere]).absorbs).toEqual([elsewhere]);
    // A row that is not open absorbs nothing.
    expect(plan([], {}, [section]).absorbs).toEqual([]);
  });

  it('closes an open exception after two recovered evaluations', () => {
    const existing = stored();
    const first = plan([recovered()], {}, [existing]);
    expect(first.closes).toEqual([]);
    const second = plan([recovered()], first.streaks, [existing]);
    expect(second.closes).toEqual([existing]);
    expect(second.streaks[streakKey(existing)]).toEqual(CLEAR);
  });

  it('brings a still-open exception up to date: worst ratio kept, eggs lost summed by day', () => {
    const existing = stored();
    const result = plan([short({ eggs: 700, ratio: 0.7 })], {}, [existing]);
    expect(result.opens).toEqual([]);
    expect(result.updates).toHaveLength(1);
    const update = result.updates[0];
    expect(update?.figures).toMatchObject({
      eggs: 700,
      worstRatio: 0.7,
      lostByDay: { '2026-11-09': 150, [day]: 300 },
      eggsLost: 450,
    });
    expect(update?.isVisible).toBe(true);
    const milder = plan([short({ eggs: 850, ratio: 0.9 })], {}, [existing]).updates[0];
    expect(milder?.figures.worstRatio).toBe(0.85);
    expect(milder?.isVisible).toBe(false);
  });
});
