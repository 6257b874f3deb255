/**
 * Xbar and standard deviation. With equal sizes s̄ is the mean of the
 * subgroup SDs and the limits are X̿ ± A3·s̄, B3·s̄, B4·s̄. With unequal sizes
 * s̄ is the pooled SD √(Σ(nᵢ−1)sᵢ² / Σ(nᵢ−1)) and each point gets
 * X̿ ± A3(nᵢ)·s̄, B3(nᵢ)·s̄, B4(nᵢ)·s̄, as in Montgomery's variable-size
 * example; in both cases the point's sigma is s̄/c4(nᵢ).
 */
import type { Sample, Standard } from '../model.ts';
import { constants } from './constants.ts';
import { type ChartFamily, type FamilyLimits, mean, pick, threeSigma } from './family.ts';
import { type Subgroup, allSameSize, grandMean, summarise } from './subgroups.ts';

function pooledSd(groups: readonly Subgroup[]): number {
  let num = 0;
  let den = 0;
  for (const g of groups) {
    num += (g.n - 1) * g.sd * g.sd;
    den += g.n - 1;
  }
  return Math.sqrt(num / den);
}

/** Limits where each point's process sigma comes from `sigmaFor(n)`. */
function limitsFor(samples: readonly Sample[], center: number, sigmaFor: (n: number) => number): Omit<FamilyLimits, 'estimate'> {
  const groups = samples.map(summarise);
  return {
    location: groups.map((g) => threeSigma(center, sigmaFor(g.n) / Math.sqrt(g.n))),
    dispersion: groups.map((g) => {
      const k = constants(g.n);
      const sigma = sigmaFor(g.n);
      return { center: k.c4 * sigma, ucl: k.B6 * sigma, lcl: k.B5 * sigma, sigma: Math.sqrt(1 - k.c4 * k.c4) * sigma };
    }),
  };
}

export const xbarS: ChartFamily = {
  id: 'xbar-s',
  label: 'Xbar and standard deviation',
  observation: 'measurements',
  standardKind: 'variables',
  dispersionLabel: 'Standard deviation',
  statisticLabel: 'subgroup mean',
  values(samples) {
    const groups = samples.map(summarise);
    return { location: groups.map((g) => g.mean), dispersion: groups.map((g) => g.sd) };
  },
  fromData(samples, basis) {
    const groups = pick(samples, basis).map(summarise);
    const center = grandMean(groups);
    const equal = allSameSize(groups);
    const sBar = equal ? mean(groups.map((g) => g.sd)) : pooledSd(groups);
    const limits = limitsFor(samples, center, (n) => sBar / constants(n).c4);
    const estimate: Record<string, number> = { grandMean: center, sBar };
    if (equal) estimate.sigma = sBar / constants(groups[0]!.n).c4;
    return { ...limits, estimate };
  },
  fromStandard(samples, standard: Standard) {
    if (standard.kind !== 'variables') throw new Error('internal: xbar-s needs a variables standard');
    return {
      ...limitsFor(samples, standard.center, () => standard.sigma),
      estimate: { grandMean: standard.center, sigma: standard.sigma },
    };
  },
};
