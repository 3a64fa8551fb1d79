/**
 * Deterministic randomness: every number is drawn from a generator seeded by (seed, what, when), so a run
 * gives the same eggs for the same reading however it was scheduled, retried or restarted.
 */
export function hashSeed(...parts: (string | number)[]): number {
  // FNV-1a over the parts' text.
  let hash = 0x811c9dc5;
  for (const char of parts.join('\u0001')) {
    hash ^= char.charCodeAt(0);
    hash = Math.imul(hash, 0x01000193);
  }
  return hash >>> 0;
}

/** mulberry32: a small, well-mixed 32-bit generator; uniform on [0, 1). */
export function generator(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * A Poisson draw with mean `lambda`: Knuth's product method for small means, and for large ones the normal
 * approximation N(λ, λ) rounded (Box–Muller), which is within a count of the exact law at these sizes.
 */
export function poisson(lambda: number, random: () => number): number {
  if (lambda <= 0) return 0;
  if (lambda < 40) {
    const limit = Math.exp(-lambda);
    let k = 0;
    let product = random();
    while (product > limit) {
      k += 1;
      product *= random();
    }
    return k;
  }
  const u1 = Math.max(random(), Number.EPSILON);
  const z = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * random());
  return Math.max(0, Math.round(lambda + Math.sqrt(lambda) * z));
}
