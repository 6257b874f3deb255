/**
 * g chart: opportunities (units, days, hours) between events, geometric for
 * events that happen independently at a constant rate. The distribution is
 * very skewed, so the limits are probability limits and the center line is
 * the median, as Benneyan (2001, Health Care Management Science 4:305–318)
 * recommends; the 3-sigma upper limit ḡ + 3√(ḡ(ḡ+1)) (Kaminsky et al. 1992,
 * JQT 24:63–69) is kept in the estimates for comparison.
 *
 * Counting from a = 0 ("between" excludes the event itself):
 * p̂ = 1/(ḡ + 1) and the q-quantile is k_q = ⌈ln(1−q)/ln(1−p̂) − 1⌉, for
 * q = 0.00135, 0.5 and 0.99865 — the tail areas of 3-sigma limits. Longer
 * gaps mean fewer events: a point above the upper limit is an improvement,
 * which a c chart whose lower limit is 0 can never show.
 */
import type { Sample, Standard } from '../model.ts';
import { type ChartFamily, type FamilyLimits, type Limits, expectKind, mean, pick } from './family.ts';

export const TAIL = 0.00135;

/** The q-quantile of the geometric distribution on 0, 1, 2, … with success probability p. */
export function geometricQuantile(q: number, p: number): number {
  if (p >= 1) return 0;
  return Math.max(0, Math.ceil(Math.log(1 - q) / Math.log(1 - p) - 1 - 1e-12));
}

function limitsFor(samples: readonly Sample[], gBar: number): FamilyLimits {
  const pHat = 1 / (gBar + 1);
  const sigma = Math.sqrt(gBar * (gBar + 1));
  const row: Limits = {
    center: geometricQuantile(0.5, pHat),
    ucl: geometricQuantile(1 - TAIL, pHat),
    lcl: geometricQuantile(TAIL, pHat),
    sigma,
  };
  return {
    location: samples.map(() => row),
    estimate: { gBar, pHat, median: row.center, ucl3Sigma: gBar + 3 * sigma },
  };
}

const between = (s: Sample) => expectKind(s, 'gap').between;

export const g: ChartFamily = {
  id: 'g',
  label: 'g (opportunities between events)',
  observation: 'gap',
  standardKind: 'attributes',
  statisticLabel: 'opportunities between events',
  values(samples) {
    return { location: samples.map(between) };
  },
  fromData(samples, basis) {
    return limitsFor(samples, mean(pick(samples, basis).map(between)));
  },
  fromStandard(samples, standard: Standard) {
    return limitsFor(samples, standard.center);
  },
  runModel(s, _l, estimate) {
    return estimate.pHat === undefined ? undefined : { kind: 'geometric', count: between(s), p: estimate.pHat };
  },
};
