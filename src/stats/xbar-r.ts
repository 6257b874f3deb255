/**
 * Xbar and range. With equal subgroup sizes sigma is R̄/d2 and the limits are
 * X̿ ± A2·R̄, D3·R̄, D4·R̄. With unequal sizes sigma is the mean of Rᵢ/d2(nᵢ)
 * (which reduces to R̄/d2 for equal sizes) and every point gets limits for
 * its own size; the S chart is the better choice there.
 */
import type { Sample, Standard } from '../model.ts';
import { constants } from './constants.ts';
import { type ChartFamily, type FamilyLimits, mean, pick, threeSigma } from './family.ts';
import { allSameSize, grandMean, summarise } from './subgroups.ts';

function limitsFromSigma(samples: readonly Sample[], center: number, sigma: number): Omit<FamilyLimits, 'estimate'> {
  const groups = samples.map(summarise);
  return {
    location: groups.map((g) => threeSigma(center, sigma / Math.sqrt(g.n))),
    dispersion: groups.map((g) => {
      const k = constants(g.n);
      return { center: k.d2 * sigma, ucl: k.D2 * sigma, lcl: k.D1 * sigma, sigma: k.d3 * sigma };
    }),
  };
}

export const xbarR: ChartFamily = {
  id: 'xbar-r',
  label: 'Xbar and range',
  observation: 'measurements',
  standardKind: 'variables',
  dispersionLabel: 'Range',
  statisticLabel: 'subgroup mean',
  values(samples) {
    const groups = samples.map(summarise);
    return { location: groups.map((g) => g.mean), dispersion: groups.map((g) => g.range) };
  },
  fromData(samples, basis) {
    const groups = pick(samples, basis).map(summarise);
    const center = grandMean(groups);
    const rBar = mean(groups.map((g) => g.range));
    const sigma = allSameSize(groups)
      ? rBar / constants(groups[0]!.n).d2
      : mean(groups.map((g) => g.range / constants(g.n).d2));
    return { ...limitsFromSigma(samples, center, sigma), estimate: { grandMean: center, rBar, sigma } };
  },
  fromStandard(samples, standard: Standard) {
    if (standard.kind !== 'variables') throw new Error('internal: xbar-r needs a variables standard');
    return {
      ...limitsFromSigma(samples, standard.center, standard.sigma),
      estimate: { grandMean: standard.center, sigma: standard.sigma },
    };
  },
};
