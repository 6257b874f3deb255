/**
 * t chart: time between events, exponential when events arrive at a constant
 * rate. Nelson's power transformation y = t^(1/3.6) makes exponential data
 * nearly symmetric (Nelson 1994, JQT 26(3):239–240), so an individuals chart
 * applies on y: ȳ ± 3·MR̄y/d2, with the lower limit at least 0; the limits are
 * carried back to days by ^3.6. Points are judged on the y scale. Longer
 * gaps mean fewer events: a point above the upper limit is an improvement.
 *
 * A standard (the known mean time θ between events) gives y's mean and sigma
 * from the exponential model: E[Y] = θ^k·Γ(1+k), Var[Y] = θ^(2k)·(Γ(1+2k) − Γ(1+k)²), k = 1/3.6.
 */
import type { Sample, Standard } from '../model.ts';
import { constants } from './constants.ts';
import { type ChartFamily, type FamilyLimits, type Limits, expectKind, mean, pick } from './family.ts';
import { lnGamma } from './gamma.ts';

export const T_EXPONENT = 1 / 3.6;

const days = (s: Sample) => expectKind(s, 'interval').days;
export const toY = (t: number) => t ** T_EXPONENT;
const fromY = (y: number) => Math.max(0, y) ** (1 / T_EXPONENT);

function limitsFor(samples: readonly Sample[], yBar: number, sigmaY: number, estimate: Record<string, number>): FamilyLimits {
  const row: Limits = {
    center: fromY(yBar),
    ucl: fromY(yBar + 3 * sigmaY),
    lcl: fromY(yBar - 3 * sigmaY),
    sigma: sigmaY,
    transform: { kind: 'power', exponent: T_EXPONENT },
  };
  return { location: samples.map(() => row), estimate };
}

export const t: ChartFamily = {
  id: 't',
  label: 't (time between events)',
  observation: 'interval',
  standardKind: 'attributes',
  statisticLabel: 'days between events',
  values(samples) {
    return { location: samples.map(days) };
  },
  fromData(samples, basis) {
    const ts = pick(samples, basis).map(days);
    const ys = ts.map(toY);
    const yBar = mean(ys);
    const mrBarY = mean(ys.slice(1).map((y, i) => Math.abs(y - ys[i]!)));
    const sigmaY = mrBarY / constants(2).d2;
    return limitsFor(samples, yBar, sigmaY, { meanDays: mean(ts), yBar, mrBarY, sigmaY });
  },
  fromStandard(samples, standard: Standard) {
    const k = T_EXPONENT;
    const g1 = Math.exp(lnGamma(1 + k));
    const g2 = Math.exp(lnGamma(1 + 2 * k));
    const yBar = standard.center ** k * g1;
    const sigmaY = standard.center ** k * Math.sqrt(g2 - g1 * g1);
    return limitsFor(samples, yBar, sigmaY, { meanDays: standard.center, yBar, sigmaY });
  },
};
