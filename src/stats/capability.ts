/**
 * Process capability (Cp, Cpk, from the within-subgroup sigma) and
 * performance (Pp, Ppk, from the overall sample SD of every individual
 * value), each with a 95 % interval, and the expected parts per million
 * outside the specification from the normal model.
 *
 * - Cp = (USL − LSL)/6σ, Cpk = min(USL − μ, μ − LSL)/3σ (one side where the
 *   specification has one limit) — Montgomery, Introduction to Statistical
 *   Quality Control, ch. 8; ISO 22514.
 * - Cp and Pp interval: Ĉ·√(χ²(α/2; ν)/ν) to Ĉ·√(χ²(1−α/2; ν)/ν) with ν = N − 1
 *   (Montgomery, ch. 8). With a sigma from ranges or moving ranges the true
 *   degrees of freedom are fewer; N − 1 is the usual approximation.
 * - Cpk and Ppk interval: Bissell's normal approximation (Bissell 1990,
 *   Applied Statistics 39:331–340): Ĉ ± z·√(1/(9N) + Ĉ²/(2(N−1))). Approximate.
 */
import type { Spec } from '../model.ts';
import { chiSquareQuantile, normalQuantile } from './distributions.ts';
import { normalCdf } from './normal.ts';

export interface Index {
  readonly value: number;
  readonly interval: readonly [number, number];
}

export interface CapabilityFigures {
  /** Individual values the figures rest on. */
  readonly values: number;
  readonly mean: number;
  readonly sigmaWithin: number;
  readonly sigmaOverall: number;
  /** Null where the specification has one limit only. */
  readonly cp: Index | null;
  readonly cpk: Index;
  readonly pp: Index | null;
  readonly ppk: Index;
  /** Expected parts per million outside the specification, normal model. */
  readonly ppmWithin: number;
  readonly ppmOverall: number;
}

const LEVEL = 0.95;

export function cpInterval(c: number, n: number, level = LEVEL): [number, number] {
  const a = (1 - level) / 2;
  const nu = n - 1;
  return [c * Math.sqrt(chiSquareQuantile(a, nu) / nu), c * Math.sqrt(chiSquareQuantile(1 - a, nu) / nu)];
}

export function bissellInterval(c: number, n: number, level = LEVEL): [number, number] {
  const z = normalQuantile(1 - (1 - level) / 2);
  const half = z * Math.sqrt(1 / (9 * n) + (c * c) / (2 * (n - 1)));
  return [c - half, c + half];
}

function spread(spec: Spec, sigma: number): number | null {
  return spec.lower !== undefined && spec.upper !== undefined ? (spec.upper - spec.lower) / (6 * sigma) : null;
}

function nearest(spec: Spec, mean: number, sigma: number): number {
  const sides: number[] = [];
  if (spec.upper !== undefined) sides.push((spec.upper - mean) / (3 * sigma));
  if (spec.lower !== undefined) sides.push((mean - spec.lower) / (3 * sigma));
  return Math.min(...sides);
}

function ppm(spec: Spec, mean: number, sigma: number): number {
  const below = spec.lower !== undefined ? normalCdf((spec.lower - mean) / sigma) : 0;
  const above = spec.upper !== undefined ? 1 - normalCdf((spec.upper - mean) / sigma) : 0;
  return (below + above) * 1e6;
}

/**
 * `values`: every individual value of the basis; `mean` and `sigmaWithin`:
 * the chart's own estimates. Null without a specification limit, with fewer
 * than two values or with no spread.
 */
export function capability(spec: Spec, values: readonly number[], mean: number, sigmaWithin: number): CapabilityFigures | null {
  const n = values.length;
  if ((spec.lower === undefined && spec.upper === undefined) || n < 2) return null;
  const overallMean = values.reduce((s, x) => s + x, 0) / n;
  const sigmaOverall = Math.sqrt(values.reduce((s, x) => s + (x - overallMean) ** 2, 0) / (n - 1));
  if (!(sigmaWithin > 0) || !(sigmaOverall > 0)) return null;
  const index = (v: number | null, interval: (c: number, n: number) => [number, number]) => (v === null ? null : { value: v, interval: interval(v, n) });
  return {
    values: n,
    mean,
    sigmaWithin,
    sigmaOverall,
    cp: index(spread(spec, sigmaWithin), cpInterval),
    cpk: index(nearest(spec, mean, sigmaWithin), bissellInterval)!,
    pp: index(spread(spec, sigmaOverall), cpInterval),
    ppk: index(nearest(spec, mean, sigmaOverall), bissellInterval)!,
    ppmWithin: ppm(spec, mean, sigmaWithin),
    ppmOverall: ppm(spec, mean, sigmaOverall),
  };
}
