/**
 * The distribution functions the evidence tests need: Student's t, the
 * binomial and hypergeometric probabilities, and their inverses by bisection.
 * Written for accuracy over speed; the tests compare them with jStat.
 */
import { lnGamma } from './gamma.ts';
import { normalCdf } from './normal.ts';

export function lnBeta(a: number, b: number): number {
  return lnGamma(a) + lnGamma(b) - lnGamma(a + b);
}

/** Continued fraction for the incomplete beta (modified Lentz; Numerical Recipes §6.4). */
function betaFraction(x: number, a: number, b: number): number {
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 500; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-15) break;
  }
  return h;
}

/** The regularised incomplete beta function I_x(a, b). */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(a * Math.log(x) + b * Math.log(1 - x) - lnBeta(a, b));
  // The fraction converges fast on the side of the mean; use symmetry on the other.
  return x < (a + 1) / (a + b + 2) ? (front * betaFraction(x, a, b)) / a : 1 - (front * betaFraction(1 - x, b, a)) / b;
}

/** P(T ≤ t) for Student's t with `df` degrees of freedom (df may be fractional, as in Welch's test). */
export function studentTCdf(t: number, df: number): number {
  const tail = 0.5 * incompleteBeta(df / (df + t * t), df / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/** Inverts an increasing function on [lo, hi] by bisection, to 1e-12 of the bracket. */
export function invert(f: (x: number) => number, p: number, lo: number, hi: number): number {
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, Math.abs(lo)); i++) {
    const mid = (lo + hi) / 2;
    if (f(mid) < p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

export function normalQuantile(p: number): number {
  return invert(normalCdf, p, -40, 40);
}

export function studentTQuantile(p: number, df: number): number {
  return invert((t) => studentTCdf(t, df), p, -1e4, 1e4);
}

export function betaQuantile(p: number, a: number, b: number): number {
  return invert((x) => incompleteBeta(x, a, b), p, 0, 1);
}

export function lnChoose(n: number, k: number): number {
  return lnGamma(n + 1) - lnGamma(k + 1) - lnGamma(n - k + 1);
}

export function binomialPmf(k: number, n: number, p: number): number {
  if (p <= 0) return k === 0 ? 1 : 0;
  if (p >= 1) return k === n ? 1 : 0;
  return Math.exp(lnChoose(n, k) + k * Math.log(p) + (n - k) * Math.log(1 - p));
}

/**
 * Two-sided p-value of a discrete test: the total probability of outcomes no
 * more likely than the one observed (the "minimum likelihood" convention of
 * R's binom.test and fisher.test, with the same relative tolerance for ties),
 * for a unimodal distribution and without listing its support:
 * the outcomes more likely than the one observed lie in one run around the
 * mode, so walk out from the mode while they are, and take the rest. The
 * walk covers only where the probabilities are above the observed one's (at
 * most some tens of standard deviations), so counts in the millions cost no
 * more than a table of that run; listing every count would not fit in memory.
 */
export function minLikelihoodUnimodalP(pmf: (k: number) => number, lo: number, hi: number, mode: number, observed: number): number {
  const limit = pmf(observed) * (1 + 1e-7);
  let inside = 0;
  for (let k = mode; k <= hi; k++) {
    const q = pmf(k);
    if (q <= limit) break;
    inside += q;
  }
  for (let k = mode - 1; k >= lo; k--) {
    const q = pmf(k);
    if (q <= limit) break;
    inside += q;
  }
  return Math.min(1, Math.max(0, 1 - inside));
}

/** Exact (Clopper–Pearson) interval for a binomial proportion with k successes in n. */
export function clopperPearson(k: number, n: number, level = 0.95): [number, number] {
  const a = (1 - level) / 2;
  return [k === 0 ? 0 : betaQuantile(a, k, n - k + 1), k === n ? 1 : betaQuantile(1 - a, k + 1, n - k)];
}

/** P(X = k) for the hypergeometric count of successes in a draw of `draws` from `successes` + `failures`. */
export function hypergeometricPmf(k: number, successes: number, failures: number, draws: number): number {
  return Math.exp(lnChoose(successes, k) + lnChoose(failures, draws - k) - lnChoose(successes + failures, draws));
}

/**
 * The regularised lower incomplete gamma P(a, x): the series for x < a + 1,
 * the continued fraction (modified Lentz) above it (Numerical Recipes §6.2).
 */
export function gammaP(a: number, x: number): number {
  if (x <= 0) return 0;
  const front = Math.exp(a * Math.log(x) - x - lnGamma(a));
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 1000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-16) break;
    }
    return Math.min(1, front * sum);
  }
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return Math.max(0, 1 - front * h);
}

/** P(X ≤ x) for the chi-square distribution with `df` degrees of freedom. */
export function chiSquareCdf(x: number, df: number): number {
  return gammaP(df / 2, x / 2);
}

/** The lower p-quantile of the chi-square distribution. */
export function chiSquareQuantile(p: number, df: number): number {
  let hi = Math.max(1, df);
  while (chiSquareCdf(hi, df) < p) hi *= 2;
  return invert((x) => chiSquareCdf(x, df), p, 0, hi);
}

/** P(X ≤ k) for a Poisson count with the given mean (k whole, ≥ 0): 1 − P(k + 1, mean). */
export function poissonCdf(k: number, mean: number): number {
  if (k < 0) return 0;
  if (mean <= 0) return 1;
  return 1 - gammaP(k + 1, mean);
}

export function poissonPmf(k: number, mean: number): number {
  if (k < 0) return 0;
  if (mean <= 0) return k === 0 ? 1 : 0;
  return Math.exp(k * Math.log(mean) - mean - lnGamma(k + 1));
}

/** P(X ≤ k) for a binomial count of n trials (k whole). */
export function binomialCdf(k: number, n: number, p: number): number {
  if (k < 0) return 0;
  if (k >= n) return 1;
  // P(X ≤ k) = I_(1−p)(n − k, k + 1).
  return incompleteBeta(1 - p, n - k, k + 1);
}

/**
 * Exact (Garwood 1936) interval for a Poisson rate: C events over exposure A,
 * [χ²(α/2; 2C)/(2A), χ²(1−α/2; 2C+2)/(2A)], the lower end 0 when C = 0.
 */
export function poissonRateInterval(count: number, exposure: number, level = 0.95): [number, number] {
  const a = (1 - level) / 2;
  const lo = count === 0 ? 0 : chiSquareQuantile(a, 2 * count) / (2 * exposure);
  return [lo, chiSquareQuantile(1 - a, 2 * count + 2) / (2 * exposure)];
}
