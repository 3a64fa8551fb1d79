import { compartmentalLay, rSquared } from '@tierscope/domain';
import { levenbergMarquardt } from 'ml-levenberg-marquardt';

export interface LayCurveFit {
  params: { a: number; b: number; c: number; d: number };
  r2: number | null;
  weeks: number;
}

/** Weeks of history needed before a curve is fitted at all. */
export const MIN_WEEKS_TO_FIT = 4;

/**
 * Fits the compartmental lay curve (libs/domain `compartmentalLay`) to a flock's weekly hen-day production
 * by non-linear least squares (Levenberg–Marquardt, the general-purpose ml-levenberg-marquardt). Starts
 * from a young flock's usual shape and keeps the parameters in a plausible range; answers null with too
 * few weeks.
 */
export function fitLayCurve(
  points: readonly { ageWeeks: number; pct: number }[],
): LayCurveFit | null {
  const usable = points.filter((p) => Number.isFinite(p.pct) && p.pct >= 0 && p.pct <= 120);
  if (usable.length < MIN_WEEKS_TO_FIT) return null;
  const x = usable.map((p) => p.ageWeeks);
  const y = usable.map((p) => p.pct);
  const model =
    ([a = 0, b = 0, c = 0, d = 0]: number[]) =>
    (t: number) =>
      compartmentalLay(t, { a, b, c, d });
  const firstAge = Math.min(...x);
  const peak = Math.max(...y);
  const result = levenbergMarquardt({ x, y }, model, {
    initialValues: [Math.max(peak * 1.08, 50), 0.004, 0.4, Math.max(10, firstAge - 1.5)],
    minValues: [10, 0, 0.02, 10],
    maxValues: [140, 0.05, 3, Math.max(11, firstAge + 4)],
    damping: 1.5,
    gradientDifference: 1e-4,
    centralDifference: true,
    maxIterations: 400,
    errorTolerance: 1e-6,
  });
  const [a = 0, b = 0, c = 0, d = 0] = result.parameterValues;
  const params = { a, b, c, d };
  const fitted = x.map((t) => compartmentalLay(t, params));
  return { params, r2: rSquared(y, fitted), weeks: usable.length };
}
