/**
 * How uncertain are limits estimated from k points? The standard error of
 * each control limit from the sampling error of the estimates behind it
 * (the delta method, with the derivative taken numerically through the
 * family's own limits for given standard values):
 *
 * - variables: the center (σ/√N) and σ̂, whose coefficient of variation is
 *   d3/(d2√m) for R̄/d2 and √(1−c4²)/(c4√m) for s̄/c4 over m subgroups; for
 *   MR̄/d2 over k points the k−1 moving ranges are correlated (adjacent ones
 *   through their shared point, ρ = −1/2 between the differences), giving
 *   Var(MR̄) = σ²[(k−1)·2(1−2/π) + 2(k−2)·c]/(k−1)² with
 *   c = 2·(2/π)(√(1−ρ²) + ρ·arcsin ρ − 1) = 0.1627 (E|XY| for a bivariate
 *   normal). For k = 20 this gives SD(σ̂/σ) = 0.207, as the simulation in
 *   REFERENCE §4 (0.208) shows.
 * - attributes: the mean fraction, count or rate (binomial or Poisson
 *   standard error over the whole basis).
 *
 * Quesenberry (1993, JQT 25:237–247) puts the number of points after which
 * estimated limits behave like known ones at about 300 individual values, or
 * 400/(n−1) subgroups of size n.
 */
import type { Sample } from '../model.ts';
import { constants } from './constants.ts';
import type { ChartFamily, FamilyLimits } from './family.ts';

export interface LimitUncertainty {
  /** Points (or subgroups) the limits rest on. */
  readonly points: number;
  /** Standard error of the upper and lower limit at each sample of the baseline. */
  readonly uclSE: readonly number[];
  readonly lclSE: readonly number[];
  /** Coefficient of variation of the sigma estimate (variables charts). */
  readonly sigmaCV?: number;
  /** Points after which estimated limits behave like known ones (Quesenberry 1993), for variables charts. */
  readonly enoughPoints?: number;
}

const MODELLED: ReadonlySet<string> = new Set(['individuals', 'xbar-r', 'xbar-s', 'p', 'np', 'c', 'u']);

const RHO = -0.5;
/** Cov(|D₁|, |D₂|)/σ² for adjacent differences of independent N(0, σ²) values. */
export const ADJACENT_MR_COVARIANCE = 2 * (2 / Math.PI) * (Math.sqrt(1 - RHO * RHO) + RHO * Math.asin(RHO) - 1);
const MR_VARIANCE = 2 * (1 - 2 / Math.PI);

/** SD(MR̄/d2)/σ for k individual values. */
export function movingRangeSigmaCV(k: number): number {
  const m = k - 1;
  const v = (m * MR_VARIANCE + 2 * Math.max(0, m - 1) * ADJACENT_MR_COVARIANCE) / (m * m);
  return Math.sqrt(v) / constants(2).d2;
}

const sizeOf = (s: Sample) => {
  const o = s.observation;
  return o.kind === 'measurements' ? o.values.length : 1;
};

/**
 * `samples` and `basis` are those of one baseline (basis indices relative to it); `limits` are the limits from that basis.
 * Null for a family or basis this cannot describe (standard values, fewer than two points).
 */
export function limitUncertainty(fam: ChartFamily, samples: readonly Sample[], basis: readonly number[], limits: FamilyLimits): LimitUncertainty | null {
  // Described here: the Shewhart families. Laney's σz, the g chart's quantiles and the t chart's transform are not.
  if (basis.length < 2 || !MODELLED.has(fam.id)) return null;
  const at = (i: number) => samples[i]!;
  const perturbed = (dir: -1 | 1, param: 'center' | 'sigma', est: { center: number; sigma: number }, h: number) =>
    fam.fromStandard(
      samples,
      fam.standardKind === 'variables'
        ? { kind: 'variables', center: est.center + (param === 'center' ? dir * h : 0), sigma: est.sigma + (param === 'sigma' ? dir * h : 0) }
        : { kind: 'attributes', center: est.center + dir * h },
    ).location;

  if (fam.standardKind === 'variables') {
    const first = limits.location[basis[0]!]!;
    const center = first.center;
    // The process sigma behind the plotted statistic's sigma at a basis point.
    const sigma = first.sigma * Math.sqrt(sizeOf(at(basis[0]!)));
    const total = basis.reduce((s, i) => s + sizeOf(at(i)), 0);
    const typical = Math.max(2, Math.round(total / basis.length));
    const cv =
      fam.id === 'individuals'
        ? movingRangeSigmaCV(basis.length)
        : fam.id === 'xbar-r'
          ? constants(typical).d3 / (constants(typical).d2 * Math.sqrt(basis.length))
          : Math.sqrt(1 - constants(typical).c4 ** 2) / (constants(typical).c4 * Math.sqrt(basis.length));
    const seCenter = sigma / Math.sqrt(total);
    const seSigma = sigma * cv;
    const h = sigma * 1e-4;
    const est = { center, sigma };
    const dSigmaUp = perturbed(1, 'sigma', est, h);
    const dSigmaDown = perturbed(-1, 'sigma', est, h);
    const se = (pick: 'ucl' | 'lcl') =>
      samples.map((_, i) => {
        const dl = (dSigmaUp[i]![pick] - dSigmaDown[i]![pick]) / (2 * h);
        return Math.sqrt(seCenter ** 2 + (dl * seSigma) ** 2);
      });
    return {
      points: basis.length,
      uclSE: se('ucl'),
      lclSE: se('lcl'),
      sigmaCV: cv,
      enoughPoints: fam.id === 'individuals' ? 300 : Math.ceil(400 / (typical - 1)),
    };
  }

  const theta = limits.location[basis[0]!]!.center;
  let variance: number;
  const obs = basis.map((i) => at(i).observation);
  if (fam.observation === 'proportion') {
    const inspected = obs.reduce((s, o) => s + (o.kind === 'proportion' ? o.inspected : 0), 0);
    const p = fam.id === 'np' ? (limits.estimate.pBar ?? 0) : theta;
    variance = (p * (1 - p)) / inspected;
  } else if (fam.observation === 'rate') {
    const exposure = obs.reduce((s, o) => s + (o.kind === 'rate' ? o.exposure : 0), 0);
    variance = theta / exposure;
  } else {
    variance = theta / basis.length;
  }
  // np's standard value is the fraction, not the plotted count.
  const est = { center: fam.id === 'np' ? (limits.estimate.pBar ?? 0) : theta, sigma: 0 };
  const h = Math.max(Math.abs(est.center) * 1e-4, 1e-9);
  const up = perturbed(1, 'center', est, h);
  const down = perturbed(-1, 'center', est, h);
  const se = (pick: 'ucl' | 'lcl') => samples.map((_, i) => (Math.abs(up[i]![pick] - down[i]![pick]) / (2 * h)) * Math.sqrt(variance));
  return { points: basis.length, uclSE: se('ucl'), lclSE: se('lcl') };
}
