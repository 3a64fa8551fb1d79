import { describe, expect, it } from 'vitest';
import {
  CLEAR,
  cellsAgainstShortTiers,
  judgeCollectorGap,
  judgeHouse,
  likelyChecks,
  sectionKey,
  stepStreak,
  type HistoryDay,
  type SectionCount,
  type Streak,
} from './shortfall';

// The 10 % threshold used throughout is the trade's rule of thumb: common practice, no published source.
const ROWS = 6;
const TIERS = 3;
/** Tiers lay differently by design (where hens choose to nest); rows 1 and 6 are end rows, 8 % lower. */
const TIER_LEVEL = [1500, 1900, 1700];

function house(scale = 1, adjust: (row: number, tier: number) => number = () => 1): SectionCount[] {
  const cells: SectionCount[] = [];
  for (let row = 1; row <= ROWS; row++) {
    for (let tier = 1; tier <= TIERS; tier++) {
      const endRow = row === 1 || row === ROWS ? 0.92 : 1;
      // A little day-to-day wobble so the peers are not identical.
      const wobble = 1 + (((row * 7 + tier * 3) % 5) - 2) / 200;
      cells.push({
        row,
        tier,
        eggs: Math.round((TIER_LEVEL[tier - 1] ?? 0) * endRow * wobble * scale * adjust(row, tier)),
      });
    }
  }
  return cells;
}

function history(days = 7, adjust?: (row: number, tier: number) => number): HistoryDay[] {
  return Array.from({ length: days }, (_, i) => ({
    day: `2026-11-${String(10 + i).padStart(2, '0')}`,
    sections: house(1, adjust),
    excluded: new Set<string>(),
  }));
}

const judged = (current: SectionCount[], hist = history(), silent?: Set<string>) =>
  judgeHouse({
    rows: ROWS,
    tiers: TIERS,
    thresholdPct: 10,
    current,
    history: hist,
    ...(silent ? { silent } : {}),
  });
const shorts = (j: ReturnType<typeof judged>) => j.candidates.filter((c) => c.isShort);

/** Runs a candidate through consecutive evaluations; returns whether it opened. */
function opensAfter(evaluations: boolean[]): boolean {
  let streak: Streak = CLEAR;
  let opened = false;
  for (const isShort of evaluations) {
    const step = stepStreak(streak, { isShort, isRecovered: !isShort });
    streak = step.streak;
    if (step.change === 'open') opened = true;
  }
  return opened;
}

describe('judgeHouse: sections', () => {
  it('flags a 15 % drop on one section, and only that section', () => {
    const j = judged(house(1, (r, t) => (r === 3 && t === 2 ? 0.85 : 1)));
    expect(shorts(j).map((f) => [f.scope, f.row, f.tier])).toEqual([['section', 3, 2]]);
    const finding = shorts(j)[0]!;
    expect(finding.ratio).toBeCloseTo(0.85, 2);
    expect(finding.pValue).toBeLessThan(0.01);
    expect(finding.isLearning).toBe(false);
    // Two consecutive evaluations open it.
    expect(opensAfter([true, true])).toBe(true);
  });

  it('does not flag a steady 7 % dip', () => {
    const j = judged(house(1, (r, t) => (r === 3 && t === 2 ? 0.93 : 1)));
    expect(shorts(j)).toEqual([]);
  });

  it('does not flag an end row that is always 8 % below its peers', () => {
    // Rows 1 and 6 are 8 % lower today, as on every day of their history: that is simply how those spots are.
    const j = judged(house());
    expect(shorts(j)).toEqual([]);
    const endCell = j.cells.find((c) => c.row === 1 && c.tier === 1)!;
    expect(endCell.ratio).toBeCloseTo(1, 2);
  });

  it('would flag that end row if it had no history to learn from, and marks it learning', () => {
    const j = judged(house(), []);
    expect(shorts(j).every((f) => f.isLearning)).toBe(true);
  });

  it('raises nothing on the thin counts of the first laying hour', () => {
    // ≈ 1 % of the day's eggs by the end of the first hour: a section 30 % short is still within chance.
    const j = judged(house(0.01, (r, t) => (r === 4 && t === 1 ? 0.7 : 1)));
    expect(shorts(j)).toEqual([]);
    const cell = j.cells.find((c) => c.row === 4 && c.tier === 1)!;
    expect(cell.ratio).toBeLessThan(0.8);
    expect(cell.pValue).toBeGreaterThan(0.01);
  });

  it('treats a dead counter as a silent counter, not a shortfall', () => {
    const j = judged(
      house(1, (r, t) => (r === 2 && t === 3 ? 0 : 1)),
      history(),
      new Set([sectionKey(2, 3)]),
    );
    // Nothing at all: not the section, nor its row or tier, which are short only by the dead counter's eggs.
    expect(shorts(j)).toEqual([]);
  });

  it('does not learn a fault as normal: days with an open exception are skipped', () => {
    const faulty = history(7, (r, t) => (r === 3 && t === 2 ? 0.8 : 1));
    const clean = history(7);
    const faultyDays = faulty.map((d, i) =>
      i < 5 ? { ...d, excluded: new Set([sectionKey(3, 2)]) } : clean[i]!,
    );
    // Five of seven days were faulty and excluded; the two clean ones say the section is normal.
    const j = judged(
      house(1, (r, t) => (r === 3 && t === 2 ? 0.8 : 1)),
      faultyDays,
    );
    expect(shorts(j).map((f) => [f.row, f.tier])).toEqual([[3, 2]]);
    // Had those days been learned, the fault would look normal.
    const learned = judged(
      house(1, (r, t) => (r === 3 && t === 2 ? 0.8 : 1)),
      faulty,
    );
    expect(shorts(learned)).toEqual([]);
  });

  it('compares per hen when the section bird counts are known', () => {
    const withBirds = (cells: SectionCount[]) =>
      cells.map((c) => ({ ...c, birds: c.row === 5 ? 2400 : 2000 }));
    // Row 5 holds 20 % more hens and lays 20 % more: per hen it is normal.
    const current = withBirds(house(1, (r) => (r === 5 ? 1.2 : 1)));
    const hist = history().map((d) => ({ ...d, sections: withBirds(d.sections) }));
    expect(shorts(judged(current, hist))).toEqual([]);
  });
});

describe('judgeHouse: rows and tiers', () => {
  it('makes a whole row that is short one row exception, with row-wide checks', () => {
    const j = judged(house(1, (r) => (r === 4 ? 0.85 : 1)));
    expect(shorts(j).map((f) => [f.scope, f.row, f.tier])).toEqual([['row', 4, null]]);
    expect(likelyChecks('shortfall', 'row').join(' ')).toMatch(/feed line.*water line/);
  });

  it('flags a tier whose share of the house fell, and never compares tiers raw', () => {
    // Tier 1 always lays less than tier 2 by design: no alarm for that.
    expect(shorts(judged(house())).filter((f) => f.scope === 'tier')).toEqual([]);
    const j = judged(house(1, (_r, t) => (t === 3 ? 0.82 : 1)));
    expect(shorts(j).map((f) => [f.scope, f.tier])).toEqual([['tier', 3]]);
    expect(likelyChecks('shortfall', 'tier').join(' ')).toMatch(/lighting.*feed loop/);
  });
});

describe('cellsAgainstShortTiers', () => {
  it("shows a short tier's cells near the tier's own ratio, not near 100 %", () => {
    const j = judged(house(1, (_r, t) => (t === 3 ? 0.89 : 1)));
    const tier3 = j.cells.filter((c) => c.tier === 3);
    // Compared with their own (equally short) tier peers, every cell reads about 100 %.
    for (const cell of tier3) expect(cell.ratio).toBeGreaterThan(0.97);
    // The tier against its usual share of the house (which it pulled down a little too): about 92 %.
    const line = j.candidates.find((c) => c.scope === 'tier' && c.tier === 3)!;
    expect(line.ratio).toBeGreaterThan(0.9);
    expect(line.ratio).toBeLessThan(0.94);
    const cells = cellsAgainstShortTiers(
      j.cells,
      [{ tier: 3, eggs: line.eggs, expected: line.expected }],
      10,
    );
    for (const cell of cells.filter((c) => c.tier === 3)) {
      expect(cell.yardstick).toBe('tier');
      expect(Math.abs((cell.ratio ?? 0) - line.ratio)).toBeLessThan(0.02);
    }
    // The tier's cells together are expected to lay what the tier should have laid.
    const expectedSum = cells
      .filter((c) => c.tier === 3)
      .reduce((n, c) => n + (c.expected ?? 0), 0);
    const peersSum = tier3.reduce((n, c) => n + (c.expected ?? 0), 0);
    expect(expectedSum / peersSum).toBeCloseTo(line.expected / line.eggs, 6);
    // Other tiers keep their peers' yardstick, unchanged.
    const tier1 = cells.filter((c) => c.tier === 1);
    expect(tier1.every((c) => c.yardstick === 'peers')).toBe(true);
    expect(tier1.map((c) => c.ratio)).toEqual(
      j.cells.filter((c) => c.tier === 1).map((c) => c.ratio),
    );
  });

  it('leaves cells alone for a tier that laid its share or more, or has no data', () => {
    const j = judged(house());
    const cells = cellsAgainstShortTiers(j.cells, [{ tier: 2, eggs: 1000, expected: 900 }], 10);
    expect(cells.map((c) => c.ratio)).toEqual(j.cells.map((c) => c.ratio));
    expect(
      cellsAgainstShortTiers(j.cells, [{ tier: 2, eggs: 0, expected: 900 }], 10)[0]?.yardstick,
    ).toBe('peers');
  });
});

describe('stepStreak', () => {
  it('opens only after two consecutive short evaluations', () => {
    expect(opensAfter([true])).toBe(false);
    expect(opensAfter([true, false, true, false, true])).toBe(false);
    expect(opensAfter([false, true, true])).toBe(true);
  });

  it('closes only after two consecutive recovered evaluations, so flapping input keeps it open', () => {
    let streak: Streak = { short: 0, recovered: 0, isOpen: true };
    const changes: (string | null)[] = [];
    for (const isRecovered of [true, false, true, false, true, true]) {
      const step = stepStreak(streak, { isShort: false, isRecovered });
      streak = step.streak;
      changes.push(step.change);
    }
    expect(changes).toEqual([null, null, null, null, null, 'close']);
    expect(streak.isOpen).toBe(false);
  });
});

describe('other exception kinds', () => {
  it('sees a 4 % collector gap on a day’s counts, but not a 1 % one', () => {
    expect(judgeCollectorGap(31_200, 30_000).isGap).toBe(true);
    expect(judgeCollectorGap(30_300, 30_000).isGap).toBe(false);
    // A few eggs early in the day: a big percentage, but chance.
    expect(judgeCollectorGap(60, 50).isGap).toBe(false);
  });
});
