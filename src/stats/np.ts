/**
 * np chart, number nonconforming. Meant for a constant inspected count; where
 * the count varies each point gets nᵢp̄ ± 3√(nᵢp̄(1−p̄)), which is the p chart
 * scaled by nᵢ.
 */
import type { Sample, Standard } from '../model.ts';
import { type ChartFamily, expectKind, threeSigma } from './family.ts';
import { pooledFraction } from './p.ts';

function limitsAt(samples: readonly Sample[], pBar: number) {
  return samples.map((s) => {
    const n = expectKind(s, 'proportion').inspected;
    return threeSigma(n * pBar, Math.sqrt(n * pBar * (1 - pBar)), 0, n);
  });
}

export const np: ChartFamily = {
  id: 'np',
  label: 'np (number nonconforming)',
  observation: 'proportion',
  standardKind: 'attributes',
  statisticLabel: 'number nonconforming',
  values(samples) {
    return { location: samples.map((s) => expectKind(s, 'proportion').defectives) };
  },
  fromData(samples, basis) {
    const pBar = pooledFraction(samples, basis);
    return { location: limitsAt(samples, pBar), estimate: { pBar } };
  },
  fromStandard(samples, standard: Standard) {
    return { location: limitsAt(samples, standard.center), estimate: { pBar: standard.center } };
  },
  runModel(s, l) {
    const o = expectKind(s, 'proportion');
    return l.lcl <= 0 ? { kind: 'binomial', count: o.defectives, n: o.inspected, p: l.center / o.inspected } : undefined;
  },
};
