/**
 * The same-side run rule against the median, for counts small enough to be
 * visibly skewed.
 *
 * With about one event a period most points sit below the mean (Poisson mean
 * 1.21: P(below) = 0.66), so "8 in a row on one side of the center line"
 * comes every ~80 points instead of every ~510 (REFERENCE §1.3). Two changes
 * restore the rule's calibration:
 *
 * 1. Each point is placed against the median of its own distribution under
 *    the baseline (Poisson for c and u, binomial for p and np, geometric for
 *    g), not against the mean. A point on the median is on neither side and
 *    ends a run, as on every chart.
 * 2. Discrete counts cannot split evenly around a median (Poisson mean 1.21:
 *    0.30 below, 0.36 on, 0.34 above), so a run is counted in probability:
 *    it fires once the chance of its points all falling on that side, the
 *    product of their one-side probabilities, is no larger than (1/2)^N —
 *    the chance of N points on one side for a symmetric process, N = 8 or 9
 *    by the rule set. For a symmetric process every factor is 1/2 and this is
 *    the N-in-a-row rule itself.
 *
 * test/reference/median-run.test.ts shows by seeded simulation that the
 * false-alarm rate is then near the nominal one for symmetric data.
 */
import { binomialCdf, poissonCdf } from '../stats/distributions.ts';
import type { CountModel } from '../stats/family.ts';
import type { Side } from './rule.ts';

export interface RunSide {
  /** The point's side of its median; null when it lies on the median. */
  readonly side: Side | null;
  /** Probability under the baseline of a point falling on that side (1 on the median). */
  readonly p: number;
  /** The median the point was compared with. */
  readonly median: number;
}

/** P(X ≤ k) for the model's distribution, k whole. */
function cdf(m: CountModel, k: number): number {
  if (k < 0) return 0;
  switch (m.kind) {
    case 'poisson':
      return poissonCdf(k, m.mean);
    case 'binomial':
      return binomialCdf(k, m.n, m.p);
    case 'geometric':
      return m.p >= 1 ? 1 : 1 - (1 - m.p) ** (k + 1);
  }
}

/** The smallest whole k with P(X ≤ k) ≥ 1/2. */
export function medianOf(m: CountModel): number {
  let hi = 1;
  while (cdf(m, hi) < 0.5) hi *= 2;
  let lo = -1;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (cdf(m, mid) >= 0.5) hi = mid;
    else lo = mid;
  }
  return hi;
}

export function medianSide(m: CountModel): RunSide {
  const median = medianOf(m);
  if (m.count < median) return { side: 'below', p: cdf(m, median - 1), median };
  if (m.count > median) return { side: 'above', p: 1 - cdf(m, median), median };
  return { side: null, p: 1, median };
}
