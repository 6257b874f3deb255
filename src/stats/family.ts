/**
 * The shape every chart family module has. A family turns the samples of one
 * baseline into plotted values and, given which samples form the basis (or a
 * standard), the limits each point is judged against.
 */
import type { ChartId, Observation, Sample, Standard } from '../model.ts';

/** The limits one point is judged against, with the sigma of its plotted statistic. */
export interface Limits {
  readonly center: number;
  readonly ucl: number;
  readonly lcl: number;
  /** Sigma of the plotted statistic at this point (before truncating the limits), for zones and z-scores. */
  readonly sigma: number;
  /**
   * The limits were set on a transformed scale y = value^exponent (the t
   * chart's power transformation) and carried back; `sigma` is on that scale,
   * so z-scores are taken there.
   */
  readonly transform?: { readonly kind: 'power'; readonly exponent: number };
}

/**
 * The discrete distribution a point's plotted count follows under the
 * baseline, for the same-side run rule against the median where counts are
 * small and skewed (see src/signals/median-line.ts).
 */
export type CountModel =
  | { readonly kind: 'poisson'; readonly count: number; readonly mean: number }
  | { readonly kind: 'binomial'; readonly count: number; readonly n: number; readonly p: number }
  | { readonly kind: 'geometric'; readonly count: number; readonly p: number };

export interface PanelValues {
  readonly location: readonly number[];
  /** Moving range, range or standard deviation; `null` where undefined (the first moving range). */
  readonly dispersion?: readonly (number | null)[];
}

export interface FamilyLimits {
  readonly location: readonly Limits[];
  readonly dispersion?: readonly Limits[];
  /** The estimates behind the limits, named as in the method appendix (e.g. `mrBar`, `pBar`). */
  readonly estimate: Readonly<Record<string, number>>;
}

export interface ChartFamily {
  readonly id: ChartId;
  readonly label: string;
  readonly observation: Observation['kind'];
  /** Standard values of this kind may replace limits from the data. */
  readonly standardKind: Standard['kind'];
  /** Name of the lower panel for two-chart families. */
  readonly dispersionLabel?: string;
  /** Plotted statistic of the location panel, in words. */
  readonly statisticLabel: string;
  values(samples: readonly Sample[]): PanelValues;
  /** Limits from the samples at `basis` (indices into `samples`, in order, at least two). */
  fromData(samples: readonly Sample[], basis: readonly number[]): FamilyLimits;
  fromStandard(samples: readonly Sample[], standard: Standard): FamilyLimits;
  /**
   * Count families: the point's count and its distribution under these
   * limits, where counts are small enough that the distribution is visibly
   * skewed (the lower limit is 0); undefined elsewhere.
   */
  runModel?(sample: Sample, limits: Limits, estimate: Readonly<Record<string, number>>): CountModel | undefined;
}

/** center ± 3·sigma, truncated to [floor, ceiling] where the statistic cannot go further. */
export function threeSigma(center: number, sigma: number, floor = -Infinity, ceiling = Infinity): Limits {
  return {
    center,
    sigma,
    ucl: Math.min(ceiling, center + 3 * sigma),
    lcl: Math.max(floor, center - 3 * sigma),
  };
}

export function sum(values: readonly number[]): number {
  let s = 0;
  for (const v of values) s += v;
  return s;
}

export function mean(values: readonly number[]): number {
  return sum(values) / values.length;
}

export function pick<T>(items: readonly T[], indices: readonly number[]): T[] {
  return indices.map((i) => items[i]!);
}

/** Narrow an observation to the kind a family reads; the reader guarantees it, so a mismatch is a bug. */
export function expectKind<K extends Observation['kind']>(s: Sample, kind: K): Extract<Observation, { kind: K }> {
  if (s.observation.kind !== kind) throw new Error(`internal: sample ${s.label} holds ${s.observation.kind}, not ${kind}`);
  return s.observation as Extract<Observation, { kind: K }>;
}
