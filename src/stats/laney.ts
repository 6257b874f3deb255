/**
 * Laney's p′ and u′ charts (Laney 2002, Quality Engineering 14(4):531–537).
 * With very large subgroups the binomial or Poisson sigma is tiny and
 * ordinary period-to-period variation lands most points outside the limits.
 * Laney scales each point's sigma by σz, the spread of the z-scores
 * zᵢ = (xᵢ − x̄)/σᵢ estimated from their moving ranges (MR̄z / d2, d2 = 1.128),
 * not from their standard deviation, which a shift would inflate. σz = 1
 * gives back the ordinary chart; σz below 1 narrows the limits and is
 * reported, not floored.
 */
import type { Sample, Standard } from '../model.ts';
import { constants } from './constants.ts';
import { type ChartFamily, type FamilyLimits, expectKind, mean, pick, sum, threeSigma } from './family.ts';
import { pooledFraction } from './p.ts';

/** σz from the moving ranges of consecutive z-scores; 1 when there are too few to tell. */
export function sigmaZ(z: readonly number[]): number {
  if (z.length < 2) return 1;
  const mrs = z.slice(1).map((v, i) => Math.abs(v - z[i]!));
  return mean(mrs) / constants(2).d2;
}

interface Point {
  readonly x: number;
  /** Sigma of x under the ordinary (binomial or Poisson) model at the center `c`. */
  readonly sigmaAt: (c: number) => number;
}

function limitsFrom(points: readonly Point[], basis: readonly number[], center: number, ceiling: number, key: string): FamilyLimits {
  const z = pick(points, basis).map((p) => {
    const s = p.sigmaAt(center);
    return s > 0 ? (p.x - center) / s : 0;
  });
  const sz = sigmaZ(z);
  return {
    location: points.map((p) => threeSigma(center, p.sigmaAt(center) * sz, 0, ceiling)),
    estimate: { [key]: center, sigmaZ: sz },
  };
}

const proportionPoint = (s: Sample): Point => {
  const o = expectKind(s, 'proportion');
  return { x: o.defectives / o.inspected, sigmaAt: (c) => Math.sqrt((c * (1 - c)) / o.inspected) };
};

const ratePoint = (s: Sample): Point => {
  const o = expectKind(s, 'rate');
  return { x: o.count / o.exposure, sigmaAt: (c) => Math.sqrt(c / o.exposure) };
};

const all = (samples: readonly Sample[]) => samples.map((_, i) => i);

export const laneyP: ChartFamily = {
  id: 'laney-p',
  label: "Laney p′ (fraction nonconforming, overdispersion-adjusted)",
  observation: 'proportion',
  standardKind: 'attributes',
  statisticLabel: 'fraction nonconforming',
  values(samples) {
    return { location: samples.map((s) => proportionPoint(s).x) };
  },
  fromData(samples, basis) {
    return limitsFrom(samples.map(proportionPoint), basis, pooledFraction(samples, basis), 1, 'pBar');
  },
  // A known p fixes the center; σz still has to come from the points themselves.
  fromStandard(samples, standard: Standard) {
    return limitsFrom(samples.map(proportionPoint), all(samples), standard.center, 1, 'pBar');
  },
};

export const laneyU: ChartFamily = {
  id: 'laney-u',
  label: "Laney u′ (count per unit, overdispersion-adjusted)",
  observation: 'rate',
  standardKind: 'attributes',
  statisticLabel: 'count per unit',
  values(samples) {
    return { location: samples.map((s) => ratePoint(s).x) };
  },
  fromData(samples, basis) {
    const obs = pick(samples, basis).map((s) => expectKind(s, 'rate'));
    const uBar = sum(obs.map((o) => o.count)) / sum(obs.map((o) => o.exposure));
    return limitsFrom(samples.map(ratePoint), basis, uBar, Infinity, 'uBar');
  },
  fromStandard(samples, standard: Standard) {
    return limitsFrom(samples.map(ratePoint), all(samples), standard.center, Infinity, 'uBar');
  },
};
