import { compartmentalLay } from '@tierscope/domain';
import { describe, expect, it } from 'vitest';
import { fitLayCurve } from './lay-curve-fit';

const truth = { a: 102, b: 0.0042, c: 0.5, d: 19 };
const sse = (points: { ageWeeks: number; pct: number }[], p: typeof truth) =>
  points.reduce((s, q) => s + (q.pct - compartmentalLay(q.ageWeeks, p)) ** 2, 0);

describe('fitLayCurve', () => {
  it('finds the curve back from weekly production with a little noise', () => {
    // A fixed, zero-mean pattern of ±0.8 points stands in for week-to-week noise.
    const noise = [0.6, -0.8, 0.3, -0.2, 0.8, -0.5, 0.1, -0.3, 0.5, -0.6];
    const points = Array.from({ length: 30 }, (_, i) => ({
      ageWeeks: 20 + i,
      pct: compartmentalLay(20 + i, truth) + (noise[i % noise.length] ?? 0),
    }));
    const fit = fitLayCurve(points);
    expect(fit).not.toBeNull();
    expect(fit!.r2).toBeGreaterThan(0.98);
    // A least-squares fit is at least as close to the data as the curve that made it.
    expect(sse(points, fit!.params)).toBeLessThanOrEqual(sse(points, truth) * 1.001);
    expect(compartmentalLay(30, fit!.params)).toBeCloseTo(compartmentalLay(30, truth), 0);
  });

  it('does not fit with fewer than four weeks', () => {
    expect(fitLayCurve([{ ageWeeks: 20, pct: 10 }])).toBeNull();
  });

  it('gives a poor R² for data that do not follow a lay curve', () => {
    const points = Array.from({ length: 10 }, (_, i) => ({
      ageWeeks: 30 + i,
      pct: i % 2 === 0 ? 40 : 95,
    }));
    const fit = fitLayCurve(points);
    expect(fit!.r2).toBeLessThan(0.5);
  });
});
