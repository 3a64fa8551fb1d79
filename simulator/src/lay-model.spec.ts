import { describe, expect, it } from 'vitest';
import { layRate, layShare } from './lay-model';

describe('layRate (McMillan compartmental form, equation from memory)', () => {
  // IASRI "Production indices – Layers" (TRADE-FACTS.md §2, [S]): lay starts ≈21 wk, ≥ 90 % by 28 wk and holds to
  // 40–42 wk, ≤ 70 % by 72 wk.
  it('is zero before first egg and at least 90 % from 28 to 40 weeks', () => {
    expect(layRate(18)).toBe(0);
    for (const age of [28, 32, 36, 40]) expect(layRate(age)).toBeGreaterThanOrEqual(0.9);
  });

  it('has fallen to 70 % or less by 72 weeks', () => {
    expect(layRate(72)).toBeLessThanOrEqual(0.7);
    expect(layRate(72)).toBeGreaterThan(0.5);
  });
});

describe('layShare', () => {
  it('spreads the whole day over the light period and nothing into the dark', () => {
    expect(layShare(0, 16, 16)).toBeCloseTo(1, 10);
    expect(layShare(16, 24, 16)).toBe(0);
  });

  // Patterson (1997), J. Appl. Poult. Res. 6(4):381–390 via TRADE-FACTS.md §2: on 16L:8D about half the eggs
  // come within ≈5 h of lights-on (an inference [C]); we accept 45–65 %.
  it('puts about half of the eggs in the first 5 hours of a 16-hour day', () => {
    const share = layShare(0, 5, 16);
    expect(share).toBeGreaterThan(0.45);
    expect(share).toBeLessThan(0.65);
  });
});
