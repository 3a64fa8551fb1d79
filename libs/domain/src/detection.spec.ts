import { describe, expect, it } from 'vitest';
import {
  measuredWords,
  cusumStep,
  CUSUM_START,
  judgeHouseDay,
  judgeSpot,
  learnNorm,
  robustSd,
  type CusumState,
} from './detection';

describe('robustSd', () => {
  it('is the MAD × 1.4826 of the MZ1 example', () => {
    // Fixture MZ1 (TRADE-FACTS §5: a calculator example at codingace.net, not NIST): median 12, MAD 1.
    // Eight values: × the small-sample factor 1.129.
    expect(robustSd([10, 12, 12, 13, 12, 11, 14, 300])).toBeCloseTo(1.4826 * 1.129, 4);
  });

  it('is unbiased for a normal σ at every sample size from 2 to 28 (Monte Carlo)', () => {
    // The check on the small-sample factors: the mean of robustSd over 40,000 samples of n standard normal
    // values is 1 within 3 % (without the factors, n = 3 gives 0.67 and n = 8 gives 0.89).
    let state = 2026;
    const uniform = () => {
      state = (Math.imul(state, 1103515245) + 12345) >>> 0;
      return (state + 0.5) / 4294967296;
    };
    const normal = () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
    for (const n of [2, 3, 4, 5, 6, 7, 8, 9, 10, 14, 28]) {
      let sum = 0;
      const draws = 40_000;
      for (let i = 0; i < draws; i++) sum += robustSd(Array.from({ length: n }, normal)) ?? 0;
      expect(Math.abs(sum / draws - 1), `n = ${n}`).toBeLessThan(0.03);
    }
  });

  it('adds the small-sample factor n / (n − 0.8) past nine values', () => {
    // Twelve values with median 0 and MAD 1: 1.4826 × 12 / 11.2.
    const values = [-3, -2, -1, -1, -1, 0, 0, 1, 1, 1, 2, 3];
    expect(robustSd(values)).toBeCloseTo((1.4826 * 12) / 11.2, 6);
  });
});

describe('cusumStep', () => {
  it('signals first at observation 14 of the NIST/SEMATECH tabular CUSUM example', () => {
    // NIST/SEMATECH e-Handbook §6.3.2.3 (pmc323.htm), data as transcribed in TRADE-FACTS §5 [S2]: target 325,
    // k = 0.3175, h = 4.1959; S_hi first exceeds h at observation 14 (4.945) [C]. The upper side of x is the
    // lower side of 325 − x, which is what cusumStep keeps.
    const x = [
      324.93, 324.68, 324.73, 324.35, 325.35, 325.23, 324.13, 324.53, 325.23, 324.6, 324.63, 325.15,
      328.33, 327.25, 327.83, 328.5, 326.68, 327.78, 326.88, 328.35,
    ];
    let state: CusumState = CUSUM_START;
    const sums: number[] = [];
    let first: number | null = null;
    x.forEach((value, i) => {
      const step = cusumStep(state, 325 - value, 1, 10, { k: 0.3175, h: 4.1959, clamp: 100 });
      sums.push(-step.state.sum);
      if (step.isAlarm && first === null) first = i + 1;
      state = step.state;
    });
    expect(first).toBe(14);
    expect(sums[12]).toBeCloseTo(3.0125, 4);
    expect(sums[13]).toBeCloseTo(4.945, 4);
  });

  it('stays in control on the Montgomery & Runger example 16-6', () => {
    // Montgomery & Runger, Applied Statistics and Probability for Engineers, Ex. 16-6, Tables 16-7/16-8
    // (TRADE-FACTS §5 [S]): μ0 = 99, K = 1, H = 10; S_L = 0, 3.2, 2.9, 2.5, 0, … never exceeds 10.
    const x = [
      102.0, 94.8, 98.3, 98.4, 102.0, 98.5, 99.0, 97.7, 100.0, 98.1, 101.3, 98.7, 101.1, 98.4, 97.0,
      96.7, 100.3, 101.4, 97.2, 101.0,
    ];
    const expected = [0, 3.2, 2.9, 2.5, 0, 0, 0, 0.3, 0, 0, 0, 0, 0, 0, 1.0, 2.3, 0, 0, 0.8, 0];
    let state: CusumState = CUSUM_START;
    x.forEach((value, i) => {
      const step = cusumStep(state, value - 99, 1, 10, { k: 1, h: 10, clamp: 100 });
      expect(-step.state.sum).toBeCloseTo(expected[i] ?? NaN, 6);
      expect(step.isAlarm).toBe(false);
      state = step.state;
    });
  });

  it('calls a run of small wobbles no shortfall even past h (the run must be ¾ of the threshold below)', () => {
    let state: CusumState = CUSUM_START;
    let isAlarm = false;
    for (let day = 0; day < 40; day++) {
      // 2 % below every day with a 0.2 % wobble: far past h, but only 2 % short.
      const step = cusumStep(state, Math.log(0.98), 0.002, 10);
      isAlarm ||= step.isAlarm;
      state = step.state;
    }
    expect(isAlarm).toBe(false);
  });
});

describe('judgeSpot', () => {
  const norm = learnNorm([0.01, -0.02, 0.0, 0.03, -0.01, 0.02, -0.03, 0.0]);

  it('needs both: more than the threshold below and far outside the usual wobble', () => {
    const wobble = 0.03;
    // 15 % below at a 3 % wobble: both.
    expect(judgeSpot({ own: 850, yardstick: 1000 }, norm, wobble, 10).isShort).toBe(true);
    // 12 % below at a 5 % wobble: past the threshold, but only 2.6 σ: not short.
    expect(judgeSpot({ own: 880, yardstick: 1000 }, norm, 0.05, 10).isShort).toBe(false);
    // 6 % below at a 1 % wobble: very unusual, but under the 10 % threshold: not short.
    expect(judgeSpot({ own: 940, yardstick: 1000 }, norm, 0.01, 10).isShort).toBe(false);
  });

  it('takes a ratio a person accepted as normal as the spot’s usual', () => {
    const verdict = judgeSpot({ own: 880, yardstick: 1000 }, norm, 0.02, 10, Math.log(0.88));
    expect(verdict.ratio).toBeCloseTo(1, 6);
    expect(verdict.isShort).toBe(false);
  });
});

describe('measuredWords', () => {
  it('says how far below and how unusual in words, with thousands separated, never a p-value', () => {
    const text = measuredWords({
      kind: 'shortfall',
      eggs: 5423,
      expected: 6541,
      ratio: 5423 / 6541,
      pValue: 2.6e-46,
    });
    expect(text).toBe(
      "17 % below expected: 5,423 eggs where 6,541 were expected — far outside this spot's usual day-to-day wobble",
    );
    expect(
      measuredWords({ kind: 'shortfall', eggs: 880, expected: 1000, ratio: 0.88, pValue: 0.02 }),
    ).toContain('within what this spot sometimes does');
  });

  it('says what a silent counter should have counted, and which way a collector is off', () => {
    expect(
      measuredWords({ kind: 'silent_counter', eggs: 0, expected: 37.2, ratio: 0, pValue: 0 }),
    ).toBe('counted nothing where its peers say about 37 eggs were due — not chance');
    expect(
      measuredWords({
        kind: 'collector_gap',
        eggs: 10420,
        expected: 10000,
        ratio: 1.042,
        pValue: 0,
      }),
    ).toBe('the collector counted 4.2 % more eggs than the belts (10,420 against 10,000)');
  });
});

describe('judgeHouseDay', () => {
  // A week of hen-day figures around 92 % with a day-to-day wobble of about 1 % (generated, not identical).
  const week = [92.4, 91.1, 92.9, 91.8, 92.2, 93.0, 91.5];

  it('calls a day more than 5 % below its recent median and far outside their wobble a dip', () => {
    const dip = judgeHouseDay(85, week);
    expect(dip.expected).toBeCloseTo(92.2, 6);
    expect(dip.isDip).toBe(true);
    expect(dip.z).toBeLessThan(-4);
  });

  it('does not call 3 % below a dip, nor anything before three days are known', () => {
    expect(judgeHouseDay(89.4, week).isDip).toBe(false);
    expect(judgeHouseDay(50, [92, 91]).isDip).toBe(false);
  });

  it('does not call 6 % below a dip where the days themselves wobble by several per cent', () => {
    // A young flock's days moving by 4–6 % (robust sd about 5 %): 6 % down is not unusual for it.
    const wobbly = [80, 86, 78, 84, 88, 81, 90];
    const day = judgeHouseDay(0.94 * 84, wobbly);
    expect(day.ratio).toBeLessThan(0.95);
    expect(day.isDip).toBe(false);
  });
});
