/** Median of a list (the mean of the two middle values for an even count); NaN for an empty list. */
export function median(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1
    ? (sorted[middle] ?? Number.NaN)
    : ((sorted[middle - 1] ?? 0) + (sorted[middle] ?? 0)) / 2;
}

/** ln Γ(x) for x > 0 (Lanczos approximation, g = 7, 9 terms; about 15 significant digits). */
export function logGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
    -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
    1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let sum = c[0] ?? 0;
  for (let i = 1; i < 9; i++) sum += (c[i] ?? 0) / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(sum);
}

/**
 * The regularized upper incomplete gamma function Q(a, x) = Γ(a, x) / Γ(a): a series below a + 1 and
 * a continued fraction above it (the classic split; accurate for counts in the millions).
 */
export function regularizedUpperGamma(a: number, x: number): number {
  if (x <= 0) return 1;
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 100_000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-15) break;
    }
    return Math.max(0, 1 - sum * Math.exp(-x + a * Math.log(x) - logGamma(a)));
  }
  // Lentz's method for the continued fraction.
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 100_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-15) break;
  }
  return Math.min(1, Math.exp(-x + a * Math.log(x) - logGamma(a)) * h);
}

/**
 * P(X ≤ k) for X ~ Poisson(λ): the one-sided p-value of seeing as few as k eggs where λ were expected.
 * Uses P(X ≤ k) = Q(k + 1, λ).
 */
export function poissonLowerTail(k: number, lambda: number): number {
  if (lambda <= 0) return 1;
  if (k < 0) return 0;
  return regularizedUpperGamma(Math.floor(k) + 1, lambda);
}

/** Standard normal upper tail P(Z ≥ z) (erfc by Numerical Recipes' Chebyshev fit, |error| < 1.2e-7). */
export function normalUpperTail(z: number): number {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.5 * x);
  const erfc =
    t *
    Math.exp(
      -x * x -
        1.26551223 +
        t *
          (1.00002368 +
            t *
              (0.37409196 +
                t *
                  (0.09678418 +
                    t *
                      (-0.18628806 +
                        t *
                          (0.27886807 +
                            t *
                              (-1.13520398 +
                                t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return z >= 0 ? erfc / 2 : 1 - erfc / 2;
}
