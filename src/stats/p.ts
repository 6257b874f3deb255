/**
 * p chart, fraction nonconforming. p̄ = Σd / Σn over the basis (not the mean
 * of the fractions); each point gets p̄ ± 3√(p̄(1−p̄)/nᵢ), kept within [0, 1].
 */
import type { Sample, Standard } from '../model.ts';
import { type ChartFamily, expectKind, pick, sum, threeSigma } from './family.ts';

export const p: ChartFamily = {
  id: 'p',
  label: 'p (fraction nonconforming)',
  observation: 'proportion',
  standardKind: 'attributes',
  statisticLabel: 'fraction nonconforming',
  values(samples) {
    return { location: samples.map((s) => { const o = expectKind(s, 'proportion'); return o.defectives / o.inspected; }) };
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
    return l.lcl <= 0 ? { kind: 'binomial', count: o.defectives, n: o.inspected, p: l.center } : undefined;
  },
};

/** p̄ = Σd / Σn over the basis: every inspected unit weighs the same (shared with the np chart). */
export function pooledFraction(samples: readonly Sample[], basis: readonly number[]): number {
  const obs = pick(samples, basis).map((s) => expectKind(s, 'proportion'));
  return sum(obs.map((o) => o.defectives)) / sum(obs.map((o) => o.inspected));
}

function limitsAt(samples: readonly Sample[], pBar: number) {
  return samples.map((s) => {
    const n = expectKind(s, 'proportion').inspected;
    return threeSigma(pBar, Math.sqrt((pBar * (1 - pBar)) / n), 0, 1);
  });
}
