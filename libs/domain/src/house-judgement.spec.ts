import { describe, expect, it } from 'vitest';
import {
  CHECKPOINT_HOURS,
  COMPLETE_DAY,
  CONFIRM_Z,
  spotKeyOf,
  type SectionCounts,
} from './detection';
import { judgeStage, pastDayOf, type PastDay } from './house-judgement';

/**
 * judgeStage on noisy generated days (never identical history days): each section lays a lognormal 2.5 %
 * day-to-day factor around its own persistent level, with binomial-sized counting noise, from a seeded
 * generator. The claims are about noise: quiet without a fault, and the fault found at its own scope.
 */
function seeded(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function normal(random: () => number): number {
  return Math.sqrt(-2 * Math.log(Math.max(random(), 1e-12))) * Math.cos(2 * Math.PI * random());
}

const ROWS = 8;
const TIERS = 3;
/** Share of a day's eggs by each checkpoint (a smooth morning curve). */
const SHARES = [...CHECKPOINT_HOURS.map((h) => 1 - Math.exp(-h / 4)), 1];

function makeDay(
  random: () => number,
  factorOf: (row: number, tier: number) => number,
  /** each section's day-to-day wobble (lognormal σ) */
  noise = 0.025,
): SectionCounts[] {
  const sections: SectionCounts[] = [];
  const house = Math.exp(0.01 * normal(random));
  for (let row = 1; row <= ROWS; row++) {
    for (let tier = 1; tier <= TIERS; tier++) {
      const level = (row === 1 || row === ROWS ? 0.95 : 1) * (tier === 1 ? 0.94 : 1);
      const mean = 775 * level * house * Math.exp(noise * normal(random)) * factorOf(row, tier);
      const total = Math.max(0, Math.round(mean + Math.sqrt(mean * 0.1) * normal(random)));
      sections.push({ row, tier, byStage: SHARES.map((share) => Math.round(total * share)) });
    }
  }
  return sections;
}

function history(random: () => number, days: number, noise = 0.025): PastDay[] {
  const past: PastDay[] = [];
  for (let d = 0; d < days; d++)
    past.unshift(
      pastDayOf(
        `d${d}`,
        makeDay(random, () => 1, noise),
        new Set(),
      ),
    );
  return past;
}

describe('judgeStage on noisy days', () => {
  it('raises nothing on 14 fault-free days, at any stage', () => {
    const random = seeded(11);
    const past = history(random, 28);
    let raised = 0;
    for (let d = 0; d < 14; d++) {
      const today = makeDay(random, () => 1);
      for (let stage = 0; stage <= COMPLETE_DAY; stage++) {
        raised += judgeStage({ thresholdPct: 10, stage, sections: today, past }).short.length;
      }
      past.unshift(pastDayOf(`t${d}`, today, new Set()));
    }
    expect(raised).toBe(0);
  });

  it('finds a section 20 % short as that section', () => {
    const random = seeded(12);
    const past = history(random, 28);
    const today = makeDay(random, (row, tier) => (row === 3 && tier === 2 ? 0.8 : 1));
    const judged = judgeStage({ thresholdPct: 10, stage: COMPLETE_DAY, sections: today, past });
    expect(judged.short.map((s) => s.key)).toEqual([spotKeyOf('section', 3, 2)]);
    expect(judged.short[0]?.ratio).toBeLessThan(0.88);
  });

  it('finds a whole row short as the row, not as its sections', () => {
    const random = seeded(13);
    const past = history(random, 28);
    const today = makeDay(random, (row) => (row === 5 ? 0.85 : 1));
    const judged = judgeStage({ thresholdPct: 10, stage: COMPLETE_DAY, sections: today, past });
    expect(judged.short.map((s) => s.key)).toEqual([spotKeyOf('row', 5, null)]);
  });

  it('finds a whole tier short against the rest of the house, with its full drop', () => {
    const random = seeded(14);
    const past = history(random, 28);
    const today = makeDay(random, (_row, tier) => (tier === 3 ? 0.85 : 1));
    const judged = judgeStage({ thresholdPct: 10, stage: COMPLETE_DAY, sections: today, past });
    expect(judged.short.map((s) => s.key)).toEqual([spotKeyOf('tier', null, 3)]);
    // Against the rest of the house, a 15 % drop reads as about 15 % (not diluted by its own drop).
    expect(judged.short[0]?.ratio).toBeLessThan(0.89);
  });

  it('fills in a tier under an open exception for the house figure, even on a day it is not short', () => {
    const random = seeded(18);
    const past = history(random, 28);
    // Tier 3 is 8 % down: not short by itself today, but its exception is still open.
    const today = makeDay(random, (_row, tier) => (tier === 3 ? 0.92 : 1));
    const tier3 = spotKeyOf('tier', null, 3);
    const quiet = judgeStage({ thresholdPct: 10, stage: COMPLETE_DAY, sections: today, past });
    const open = judgeStage({
      thresholdPct: 10,
      stage: COMPLETE_DAY,
      sections: today,
      past,
      open: new Set([tier3]),
    });
    const spot = open.spots.get(tier3);
    expect(spot?.isShort).toBe(false);
    // Without the open exception the house figure is what was counted; with it, the tier's missing eggs
    // are added back, so the house-day check does not raise a second alarm for the same cause.
    expect(quiet.houseEggsFilled).toBe(quiet.houseEggs);
    expect(open.houseEggsFilled - open.houseEggs).toBeCloseTo(
      (spot?.expected ?? 0) - (spot?.eggs ?? 0),
      6,
    );
    expect(open.houseEggsFilled - open.houseEggs).toBeGreaterThan(0.05 * (spot?.expected ?? 0));
  });

  it('holds a first unusual judgement until the next stage confirms it, unless it is far down', () => {
    const random = seeded(19);
    const past = history(random, 28);
    const key = spotKeyOf('section', 3, 2);
    const judge = (drop: number, pending?: Map<string, number>) =>
      judgeStage({
        thresholdPct: 10,
        stage: COMPLETE_DAY,
        sections: makeDay(random, (row, tier) => (row === 3 && tier === 2 ? 1 - drop : 1)),
        past,
        ...(pending ? { pending } : {}),
      });
    // 16 % down is short but not far outside the wobble (4–6 wobbles): held, not raised.
    const first = judge(0.16);
    expect(first.spots.get(key)?.z).toBeGreaterThan(-6);
    expect(first.short).toEqual([]);
    expect([...first.pending.keys()]).toEqual([key]);
    // The next stage confirms it, even a little less far down…
    const second = judge(0.11, first.pending);
    expect(second.short.map((s) => s.key)).toEqual([key]);
    // …while a day back to normal drops it.
    const recovered = judge(0, first.pending);
    expect(recovered.short).toEqual([]);
    expect(recovered.pending.size).toBe(0);
    // Far down (past 6 wobbles) is an alarm at once (as the section, or as its row when that day its row's
    // other sections are down a little too).
    const far = judge(0.35);
    expect(far.pending.size).toBe(0);
    expect(far.short.map((s) => s.key)).toEqual(
      expect.arrayContaining([expect.stringMatching(/^(section:3:2|row:3:-)$/)]),
    );
  });

  // Regression (issue 11): the confirming judgement needed 3 wobbles, so a section 15 % down seen first on a
  // complete day waited past the next morning's checkpoint (z −2.3 there) and was found after two days.
  it('confirms a first sighting by a next one past three quarters of the threshold and CONFIRM_Z wobbles', () => {
    const random = seeded(29);
    const noise = 0.045;
    const past = history(random, 28, noise);
    const key = spotKeyOf('section', 4, 3);
    const judge = (stage: number, drop: number, pending?: Map<string, number>) =>
      judgeStage({
        thresholdPct: 10,
        stage,
        sections: makeDay(random, (row, tier) => (row === 4 && tier === 3 ? 1 - drop : 1), noise),
        past,
        ...(pending ? { pending } : {}),
      });
    const first = judge(COMPLETE_DAY, 0.2);
    expect(first.short).toEqual([]);
    expect([...first.pending.keys()]).toEqual([key]);
    // Past the threshold's three quarters but under CONFIRM_Z wobbles: held, not confirmed.
    const weak = judge(0, 0.085, first.pending);
    expect(weak.spots.get(key)?.ratio).toBeLessThan(0.925);
    expect(weak.spots.get(key)?.z).toBeGreaterThan(-CONFIRM_Z);
    expect(weak.short).toEqual([]);
    // Past both: confirmed.
    const next = judge(0, 0.1, first.pending);
    expect(next.spots.get(key)?.z).toBeGreaterThan(-3);
    expect(next.spots.get(key)?.z).toBeLessThanOrEqual(-CONFIRM_Z);
    expect(next.short.map((s) => s.key)).toEqual([key]);
  });

  // Regression (issue 11, seen on the demo): a row fault coming on showed first in the section with the
  // smallest wobble, confirmed as a section exception, then the row opened beside it: two alarms, one cause.
  it('holds a section whose row is down too, and raises the row alone', () => {
    const random = seeded(31);
    const past = history(random, 28);
    let pending = new Map<string, number>();
    const raised: string[] = [];
    const judge = (stage: number, factorOf: (row: number, tier: number) => number) => {
      const judged = judgeStage({
        thresholdPct: 10,
        stage,
        sections: makeDay(random, factorOf),
        past,
        pending,
      });
      pending = judged.pending;
      raised.push(...judged.short.map((spot) => spot.key));
      return judged;
    };
    // Row 4 is coming down, not yet short as a row; its tier-2 section is short first, twice.
    const coming = (row: number, tier: number) => (row === 4 ? (tier === 2 ? 0.85 : 0.925) : 1);
    const first = judge(COMPLETE_DAY, coming);
    expect(first.spots.get(spotKeyOf('section', 4, 2))?.isShort).toBe(true);
    expect(first.spots.get(spotKeyOf('row', 4, null))?.isShort).toBe(false);
    judge(0, coming);
    expect(raised).toEqual([]);
    // Then the whole row is short: the row is the one alarm, never its section.
    judge(1, (row) => (row === 4 ? 0.85 : 1));
    judge(COMPLETE_DAY, (row) => (row === 4 ? 0.85 : 1));
    expect([...new Set(raised)]).toEqual([spotKeyOf('row', 4, null)]);
  });

  it('confirms a near sighting followed by a full one, but never two near sightings', () => {
    const random = seeded(23);
    const past = history(random, 28);
    const key = spotKeyOf('section', 2, 1);
    const judge = (drop: number, pending?: Map<string, number>) =>
      judgeStage({
        thresholdPct: 10,
        stage: COMPLETE_DAY,
        sections: makeDay(random, (row, tier) => (row === 2 && tier === 1 ? 1 - drop : 1)),
        past,
        ...(pending ? { pending } : {}),
      });
    // 8 % down is past three quarters of the way (not short by both rules yet): remembered, no alarm.
    const near = judge(0.08);
    expect(near.short).toEqual([]);
    expect(near.spots.get(key)?.isShort).toBe(false);
    expect(near.pending.get(key)).toBeLessThan(0);
    // A full sighting next confirms it at once (the order of the two judgements does not matter)…
    expect(judge(0.16, near.pending).short.map((s) => s.key)).toEqual([key]);
    // …a second near sighting does not, and the memory runs out after three stages.
    const again = judge(0.08, near.pending);
    expect(again.short).toEqual([]);
    const later = judge(0, judge(0, again.pending).pending);
    expect(later.pending.has(key)).toBe(false);
  });
  it('learns a structural end row as normal', () => {
    const random = seeded(15);
    const past: PastDay[] = [];
    const endRow = (row: number) => (row === ROWS ? 0.92 : 1);
    for (let d = 0; d < 28; d++)
      past.unshift(pastDayOf(`d${d}`, makeDay(random, endRow), new Set()));
    const judged = judgeStage({
      thresholdPct: 10,
      stage: COMPLETE_DAY,
      sections: makeDay(random, endRow),
      past,
    });
    expect(judged.short).toEqual([]);
  });

  it('treats a silent section as a counter matter: no shortfall for it, its row or its tier', () => {
    const random = seeded(16);
    const past = history(random, 28);
    const today = makeDay(random, () => 1).map((s) =>
      s.row === 2 && s.tier === 1 ? { ...s, byStage: s.byStage.map(() => 0) } : s,
    );
    const judged = judgeStage({
      thresholdPct: 10,
      stage: COMPLETE_DAY,
      sections: today,
      past,
      silent: new Set([spotKeyOf('section', 2, 1)]),
    });
    expect(judged.short).toEqual([]);
    // Nothing at all counted where hundreds were due is a counter matter even before the silent check
    // has said so (a backlog judged at once)…
    const untold = judgeStage({ thresholdPct: 10, stage: COMPLETE_DAY, sections: today, past });
    expect(untold.short).toEqual([]);
    // …while a section that counts, but far less, is a shortfall of that section.
    const low = today.map((s) =>
      s.row === 2 && s.tier === 1 ? { ...s, byStage: s.byStage.map((n) => 350 + n * 0) } : s,
    );
    const lowJudged = judgeStage({ thresholdPct: 10, stage: COMPLETE_DAY, sections: low, past });
    expect(lowJudged.short.map((x) => x.key)).toEqual([spotKeyOf('section', 2, 1)]);
  });

  it('catches a 1.5 %/day slide with the CUSUM before it reaches −15 %', () => {
    const random = seeded(17);
    const past = history(random, 28);
    let cusum = new Map();
    let foundAtDrop: number | null = null;
    for (let d = 1; d <= 12 && foundAtDrop === null; d++) {
      const drop = 0.015 * d;
      const today = makeDay(random, (row, tier) => (row === 4 && tier === 2 ? 1 - drop : 1));
      const judged = judgeStage({
        thresholdPct: 10,
        stage: COMPLETE_DAY,
        sections: today,
        past,
        cusum,
      });
      cusum = judged.cusum;
      if (judged.short.some((s) => s.key === spotKeyOf('section', 4, 2))) foundAtDrop = drop;
      // The slide is not yet an exception, so its days are learned like any other (the hard case).
      past.unshift(pastDayOf(`s${d}`, today, new Set()));
    }
    expect(foundAtDrop).not.toBeNull();
    expect(foundAtDrop ?? 1).toBeLessThan(0.15);
  });
});
