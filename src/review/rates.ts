/**
 * Rates with exact intervals for rate charts (u, laney-u): each point's rate
 * and the current baseline's rate, per `per` units of exposure, each with the
 * exact Poisson (Garwood 1936) 95 % interval. With `per: 200000` and hours
 * worked as exposure this is the incidence rate of occupational safety
 * statistics: cases × 200,000 / hours worked (US Bureau of Labor Statistics;
 * 200,000 h = 100 full-time workers × 40 h × 50 weeks). Pure.
 */
import type { Sample } from '../model.ts';
import type { Baseline } from '../limits/baselines.ts';
import { poissonRateInterval } from '../stats/distributions.ts';

export interface Rate {
  readonly count: number;
  /** Exposure as the data gives it (e.g. hours worked). */
  readonly exposure: number;
  /** Events per `per` units of exposure. */
  readonly rate: number;
  readonly interval: readonly [number, number];
}

export interface RateReport {
  readonly per: number;
  /** The current baseline's rate over the points its limits rest on (every usable point for standard values). */
  readonly baseline: Rate | null;
  /** Every point's own rate, by sample index. */
  readonly points: readonly Rate[];
}

/** Undo the reader's division by `per` without its rounding noise (12 significant digits). */
export const rawExposure = (area: number, per: number) => Number((area * per).toPrecision(12));

function rateOf(count: number, area: number, per: number): Rate {
  return { count, exposure: rawExposure(area, per), rate: count / area, interval: poissonRateInterval(count, area) };
}

/** `samples` hold exposure already divided by `per` (the reader does that), so count/exposure is the rate per `per`. */
export function rateReport(samples: readonly Sample[], current: Baseline, usable: readonly number[], per: number): RateReport | null {
  const obs = samples.map((s) => (s.observation.kind === 'rate' ? s.observation : null));
  if (obs.some((o) => o === null)) return null;
  const points = obs.map((o) => rateOf(o!.count, o!.exposure, per));
  const basis = current.source === 'data' ? current.basis : usable;
  const count = basis.reduce((s, i) => s + obs[i]!.count, 0);
  const area = basis.reduce((s, i) => s + obs[i]!.exposure, 0);
  return { per, baseline: area > 0 ? rateOf(count, area, per) : null, points };
}
