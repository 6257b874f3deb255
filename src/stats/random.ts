/**
 * A seeded generator for the permutation tests and simulations of the core
 * (mulberry32: small, fast, well mixed). Seeded, so results are the same on
 * every run and the core stays pure.
 */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A standard normal deviate from two uniforms (Box–Muller). */
export function normalFrom(next: () => number): number {
  const u = 1 - next();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * next());
}

/**
 * Fisher–Yates shuffle of `x` in place, and of `w` with the same swaps when
 * it has the same length (pairs such as counts and their exposures stay
 * together). The swaps are those `next` draws for an index order of x's length.
 */
export function shuffleValues(x: Float64Array, w: Float64Array, next: () => number): void {
  const paired = w.length === x.length;
  for (let i = x.length - 1; i > 0; i--) {
    const j = Math.floor(next() * (i + 1));
    const t = x[i]!;
    x[i] = x[j]!;
    x[j] = t;
    if (paired) {
      const u = w[i]!;
      w[i] = w[j]!;
      w[j] = u;
    }
  }
}
