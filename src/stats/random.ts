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

/** Fisher–Yates shuffle of `order` in place. */
export function shuffle(order: number[], next: () => number): void {
  for (let i = order.length - 1; i > 0; i--) {
    const j = Math.floor(next() * (i + 1));
    const t = order[i]!;
    order[i] = order[j]!;
    order[j] = t;
  }
}
