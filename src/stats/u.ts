/**
 * u chart, count per unit of exposure. ū = Σc / Σa over the basis; each point
 * gets ū ± 3√(ū/aᵢ), lower limit at least 0.
 */
import type { Sample, Standard } from '../model.ts';
import { type ChartFamily, expectKind, pick, sum, threeSigma } from './family.ts';

function limitsAt(samples: readonly Sample[], uBar: number) {
  return samples.map((s) => threeSigma(uBar, Math.sqrt(uBar / expectKind(s, 'rate').exposure), 0));
}

export const u: ChartFamily = {
  id: 'u',
  label: 'u (count per unit)',
  observation: 'rate',
  standardKind: 'attributes',
  statisticLabel: 'count per unit',
  values(samples) {
    return { location: samples.map((s) => { const o = expectKind(s, 'rate'); return o.count / o.exposure; }) };
  },
  fromData(samples, basis) {
    const obs = pick(samples, basis).map((s) => expectKind(s, 'rate'));
    const uBar = sum(obs.map((o) => o.count)) / sum(obs.map((o) => o.exposure));
    return { location: limitsAt(samples, uBar), estimate: { uBar } };
  },
  fromStandard(samples, standard: Standard) {
    return { location: limitsAt(samples, standard.center), estimate: { uBar: standard.center } };
  },
  runModel(s, l) {
    const o = expectKind(s, 'rate');
    return l.lcl <= 0 ? { kind: 'poisson', count: o.count, mean: l.center * o.exposure } : undefined;
  },
};
