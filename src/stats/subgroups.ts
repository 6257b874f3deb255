/** Summaries of one subgroup of measurements, shared by the Xbar-R and Xbar-S families. */
import type { Sample } from '../model.ts';
import { expectKind, mean } from './family.ts';

export interface Subgroup {
  readonly n: number;
  readonly mean: number;
  readonly range: number;
  /** Sample standard deviation with the n − 1 divisor. */
  readonly sd: number;
}

export function summarise(s: Sample): Subgroup {
  const xs = expectKind(s, 'measurements').values;
  const m = mean(xs);
  let ss = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of xs) {
    ss += (x - m) ** 2;
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  return { n: xs.length, mean: m, range: hi - lo, sd: Math.sqrt(ss / (xs.length - 1)) };
}

/** The grand mean: every measurement weighs the same, so X̿ = Σ nᵢ x̄ᵢ / Σ nᵢ (the mean of means when sizes are equal). */
export function grandMean(groups: readonly Subgroup[]): number {
  let num = 0;
  let den = 0;
  for (const g of groups) {
    num += g.n * g.mean;
    den += g.n;
  }
  return num / den;
}

export function allSameSize(groups: readonly Subgroup[]): boolean {
  return groups.every((g) => g.n === groups[0]!.n);
}
