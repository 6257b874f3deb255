/** c chart, count of nonconformities in a constant area of opportunity: c̄ ± 3√c̄, lower limit at least 0. */
import type { Sample, Standard } from '../model.ts';
import { type ChartFamily, expectKind, mean, pick, threeSigma } from './family.ts';

function limitsAt(samples: readonly Sample[], cBar: number) {
  const row = threeSigma(cBar, Math.sqrt(cBar), 0);
  return samples.map(() => row);
}

export const c: ChartFamily = {
  id: 'c',
  label: 'c (count of nonconformities)',
  observation: 'count',
  standardKind: 'attributes',
  statisticLabel: 'count',
  values(samples) {
    return { location: samples.map((s) => expectKind(s, 'count').count) };
  },
  fromData(samples, basis) {
    const cBar = mean(pick(samples, basis).map((s) => expectKind(s, 'count').count));
    return { location: limitsAt(samples, cBar), estimate: { cBar } };
  },
  fromStandard(samples, standard: Standard) {
    return { location: limitsAt(samples, standard.center), estimate: { cBar: standard.center } };
  },
  runModel(s, l) {
    return l.lcl <= 0 ? { kind: 'poisson', count: expectKind(s, 'count').count, mean: l.center } : undefined;
  },
};
