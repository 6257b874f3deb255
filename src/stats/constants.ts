/**
 * Control-chart constants for subgroups of n = 2..25, computed rather than
 * typed in: d2 and d3 by numerical integration of the distribution of the
 * range of n standard normal values, c4 from the gamma function, and every
 * other factor from those three (formulas in the method appendix).
 */
import { lnGamma } from './gamma.ts';
import { normalCdf, normalPdf } from './normal.ts';

export const MIN_SUBGROUP = 2;
export const MAX_SUBGROUP = 25;

export interface Constants {
  readonly n: number;
  readonly d2: number;
  readonly d3: number;
  readonly c4: number;
  readonly A: number;
  readonly A2: number;
  readonly A3: number;
  readonly B3: number;
  readonly B4: number;
  readonly B5: number;
  readonly B6: number;
  readonly D1: number;
  readonly D2: number;
  readonly D3: number;
  readonly D4: number;
  readonly E2: number;
}

// One uniform grid serves both integration variables, so Φ(x + r) is a table
// look-up at index i + j. The trapezoid rule over x converges very fast for
// smooth integrands that decay on both sides; Simpson's rule is used over r,
// which starts at an end point. With this step the constants agree with a
// grid of half the step to 1e-8, and the integrands are below 1e-15 outside
// the ranges.
const H = 0.02;
const X_MIN = -8;
const X_STEPS = 800; // x in [-8, 8]
const R_STEPS = 700; // r in [0, 14]

let grid: { pdf: Float64Array; cdf: Float64Array } | undefined;
function normalGrid() {
  if (!grid) {
    const cdf = new Float64Array(X_STEPS + R_STEPS + 1);
    for (let k = 0; k < cdf.length; k++) cdf[k] = normalCdf(X_MIN + k * H);
    const pdf = new Float64Array(X_STEPS + 1);
    for (let k = 0; k <= X_STEPS; k++) pdf[k] = normalPdf(X_MIN + k * H);
    grid = { pdf, cdf };
  }
  return grid;
}

/** d2(n) = E[R] = ∫ [1 − Φ(x)^n − (1 − Φ(x))^n] dx (trapezoid; the integrand is smooth and decays fast). */
function expectedRange(n: number): number {
  const { cdf } = normalGrid();
  let sum = 0;
  for (let i = 0; i <= X_STEPS; i++) {
    const p = cdf[i]!;
    sum += 1 - p ** n - (1 - p) ** n;
  }
  return sum * H;
}

/**
 * x^k for a whole k ≥ 0 by repeated squaring: a handful of multiplications
 * for k < 25, against Math.pow's general routine, in a loop that runs half
 * a million times for each subgroup size.
 */
function integerPower(x: number, k: number): number {
  let result = 1;
  let base = x;
  for (let e = k; e > 0; e >>= 1) {
    if (e & 1) result *= base;
    base *= base;
  }
  return result;
}

/** E[R²] = 2 ∫₀^∞ r (1 − F(r)) dr with F(r) = n ∫ φ(x) [Φ(x + r) − Φ(x)]^(n−1) dx. */
function expectedSquaredRange(n: number): number {
  const { pdf, cdf } = normalGrid();
  let outer = 0;
  for (let j = 0; j <= R_STEPS; j++) {
    let inner = 0;
    for (let i = 0; i <= X_STEPS; i++) inner += pdf[i]! * integerPower(cdf[i + j]! - cdf[i]!, n - 1);
    const survival = 1 - n * inner * H;
    // Past about 8 + n/3 sigma the range is never that wide: stop once the tail is gone.
    if (j % 2 === 0 && j > 0 && survival < 1e-13) break;
    // Simpson weights over r: 1, 4, 2, 4, ..., 4, 1 (R_STEPS is even).
    const w = j === 0 || j === R_STEPS ? 1 : j % 2 === 1 ? 4 : 2;
    outer += w * j * H * survival;
  }
  return 2 * outer * (H / 3);
}

export function c4(n: number): number {
  return Math.sqrt(2 / (n - 1)) * Math.exp(lnGamma(n / 2) - lnGamma((n - 1) / 2));
}

const cache = new Map<number, Constants>();

/** All constants for subgroup size n (2..25); computed once per n, then cached. */
export function constants(n: number): Constants {
  if (!Number.isInteger(n) || n < MIN_SUBGROUP || n > MAX_SUBGROUP) {
    throw new RangeError(`control-chart constants exist here for subgroup sizes ${MIN_SUBGROUP}..${MAX_SUBGROUP}, not ${n}`);
  }
  const hit = cache.get(n);
  if (hit) return hit;
  const d2 = expectedRange(n);
  const d3 = Math.sqrt(expectedSquaredRange(n) - d2 * d2);
  const c = c4(n);
  const s = Math.sqrt(1 - c * c);
  const k: Constants = {
    n,
    d2,
    d3,
    c4: c,
    A: 3 / Math.sqrt(n),
    A2: 3 / (d2 * Math.sqrt(n)),
    A3: 3 / (c * Math.sqrt(n)),
    B3: Math.max(0, 1 - (3 * s) / c),
    B4: 1 + (3 * s) / c,
    B5: Math.max(0, c - 3 * s),
    B6: c + 3 * s,
    D1: Math.max(0, d2 - 3 * d3),
    D2: d2 + 3 * d3,
    D3: Math.max(0, 1 - (3 * d3) / d2),
    D4: 1 + (3 * d3) / d2,
    E2: 3 / d2,
  };
  cache.set(n, Object.freeze(k));
  return k;
}
