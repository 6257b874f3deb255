/** A seeded generator (mulberry32) and standard normal draws (Box–Muller), so simulations repeat exactly. */
import { seeded } from '../../src/stats/random.ts';

/** The core's own seeded generator: the same sequence for the same seed, so simulations repeat exactly. */
export const mulberry32 = seeded;

export function normals(seed: number): () => number {
  const u = mulberry32(seed);
  let spare: number | undefined;
  return () => {
    if (spare !== undefined) {
      const s = spare;
      spare = undefined;
      return s;
    }
    let u1 = u();
    while (u1 === 0) u1 = u();
    const r = Math.sqrt(-2 * Math.log(u1));
    const t = 2 * Math.PI * u();
    spare = r * Math.sin(t);
    return r * Math.cos(t);
  };
}
