/**
 * Individuals (X) with a moving range of two. Sigma is the average moving
 * range over d2(2) — never the overall standard deviation, which the very
 * shifts the chart should find would inflate.
 */
import type { Sample, Standard } from '../model.ts';
import { constants } from './constants.ts';
import { type ChartFamily, type FamilyLimits, type Limits, expectKind, mean, pick, threeSigma } from './family.ts';

function value(s: Sample): number {
  return expectKind(s, 'measurements').values[0]!;
}

function movingRanges(xs: readonly number[]): (number | null)[] {
  return xs.map((x, i) => (i === 0 ? null : Math.abs(x - xs[i - 1]!)));
}

/** The same limits at every point: one row, shared (a long series would otherwise hold a million copies). */
function limits(samples: readonly Sample[], center: number, sigma: number): FamilyLimits['location'] {
  const row = threeSigma(center, sigma);
  return samples.map(() => row);
}

/** Moving-range panel from a process sigma: CL d2·σ, limits D1·σ and D2·σ (so D3·MR̄ and D4·MR̄ when σ = MR̄/d2). */
function movingRangeLimits(samples: readonly Sample[], sigma: number): Limits[] {
  const k = constants(2);
  const row: Limits = { center: k.d2 * sigma, ucl: k.D2 * sigma, lcl: k.D1 * sigma, sigma: k.d3 * sigma };
  return samples.map(() => row);
}

export const individuals: ChartFamily = {
  id: 'individuals',
  label: 'Individuals and moving range',
  observation: 'measurements',
  standardKind: 'variables',
  dispersionLabel: 'Moving range',
  statisticLabel: 'individual value',
  values(samples) {
    const xs = samples.map(value);
    return { location: xs, dispersion: movingRanges(xs) };
  },
  fromData(samples, basis) {
    // The basis is read as one sequence: the moving ranges are those between
    // consecutive basis points, so an excluded point takes its two moving
    // ranges with it and the gap is bridged.
    const xs = pick(samples, basis).map(value);
    const mrs = movingRanges(xs).slice(1) as number[];
    const xBar = mean(xs);
    const mrBar = mean(mrs);
    const sigma = mrBar / constants(2).d2;
    return {
      location: limits(samples, xBar, sigma),
      dispersion: movingRangeLimits(samples, sigma),
      estimate: { mean: xBar, mrBar, sigma },
    };
  },
  fromStandard(samples, standard: Standard) {
    if (standard.kind !== 'variables') throw new Error('internal: individuals need a variables standard');
    return {
      location: limits(samples, standard.center, standard.sigma),
      dispersion: movingRangeLimits(samples, standard.sigma),
      estimate: { mean: standard.center, sigma: standard.sigma },
    };
  },
};
