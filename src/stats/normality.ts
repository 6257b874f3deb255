/**
 * The Anderson–Darling test of normality with mean and sigma estimated from
 * the data (Stephens' "case 3"). A² = −n − (1/n)Σ(2i−1)[ln Φ(zᵢ) + ln(1 − Φ(z₍ₙ₊₁₋ᵢ₎))]
 * on the sorted standardised values; the small-sample modification
 * A* = A²(1 + 0.75/n + 2.25/n²) and its p-value approximation are those of
 * D'Agostino & Stephens, Goodness-of-Fit Techniques (1986), Table 4.9
 * (formulas from memory; their published critical values 0.631, 0.752 and
 * 1.035 at 10 %, 5 % and 1 % are checked against them in the tests).
 */
import { normalCdf } from './normal.ts';

export interface Normality {
  readonly test: 'anderson-darling';
  readonly n: number;
  readonly statistic: number;
  /** A* = A²(1 + 0.75/n + 2.25/n²). */
  readonly adjusted: number;
  readonly p: number;
  /** p ≥ 0.05: no evidence against normality at 5 %. */
  readonly normal: boolean;
}

export function andersonDarlingP(a: number): number {
  if (a >= 0.6) return Math.exp(1.2937 - 5.709 * a + 0.0186 * a * a);
  if (a >= 0.34) return Math.exp(0.9177 - 4.279 * a - 1.38 * a * a);
  if (a >= 0.2) return 1 - Math.exp(-8.318 + 42.796 * a - 59.938 * a * a);
  return 1 - Math.exp(-13.436 + 101.14 * a - 223.73 * a * a);
}

/** Null below 8 values, where the test says little (common practice, no source). */
export function andersonDarling(values: readonly number[]): Normality | null {
  const n = values.length;
  if (n < 8) return null;
  const m = values.reduce((s, x) => s + x, 0) / n;
  const sd = Math.sqrt(values.reduce((s, x) => s + (x - m) ** 2, 0) / (n - 1));
  if (!(sd > 0)) return null;
  const f = [...values].sort((a, b) => a - b).map((x) => normalCdf((x - m) / sd));
  // Keep the logarithms finite for values far in a tail.
  const lo = 1e-300;
  let s = 0;
  for (let i = 0; i < n; i++) s += (2 * i + 1) * (Math.log(Math.max(lo, f[i]!)) + Math.log(Math.max(lo, 1 - f[n - 1 - i]!)));
  const statistic = -n - s / n;
  const adjusted = statistic * (1 + 0.75 / n + 2.25 / (n * n));
  const p = Math.min(1, Math.max(0, andersonDarlingP(adjusted)));
  return { test: 'anderson-darling', n, statistic, adjusted, p, normal: p >= 0.05 };
}
