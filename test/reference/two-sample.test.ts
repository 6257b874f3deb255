/**
 * The tests behind "did the recorded change work?", against published worked
 * examples and against jStat (a general-purpose statistics library).
 */
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { poissonRates, proportions, welch } from '../../src/stats/compare.ts';
import { betaQuantile, binomialPmf, hypergeometricPmf, incompleteBeta, normalQuantile, studentTCdf, studentTQuantile } from '../../src/stats/distributions.ts';

// jStat's own functions are good to about 1e-8 (its incomplete beta gives 0.50000002 for I_0.5(21, 21), exactly 0.5 by symmetry),
// so agreement is asserted to 7 decimals for continuous functions and 10 for probabilities.
describe('distribution functions agree with jStat', () => {
  it("Student's t distribution, including fractional degrees of freedom", () => {
    for (const df of [1, 2.5, 7.3, 17.776, 30, 200]) {
      for (const t of [-4, -1.86, -0.3, 0, 0.5, 2.1, 6]) expect(studentTCdf(t, df)).toBeCloseTo(jStat.studentt.cdf(t, df), 7);
      expect(studentTQuantile(0.975, df)).toBeCloseTo(jStat.studentt.inv(0.975, df), 7);
    }
  });
  it('the incomplete beta, its inverse and the normal quantile', () => {
    for (const [a, b] of [[0.5, 0.5], [3, 8], [21, 12], [150, 40]] as const) {
      for (const x of [0.01, 0.2, 0.5, 0.77, 0.99]) expect(incompleteBeta(x, a, b)).toBeCloseTo(jStat.ibeta(x, a, b), 7);
      expect(betaQuantile(0.025, a, b)).toBeCloseTo(jStat.beta.inv(0.025, a, b), 7);
    }
    for (const p of [0.001, 0.05, 0.5, 0.8, 0.975]) expect(normalQuantile(p)).toBeCloseTo(jStat.normal.inv(p, 0, 1), 8);
  });
  it('binomial and hypergeometric probabilities', () => {
    for (const [k, n, p] of [[0, 10, 0.3], [7, 32, 0.2], [120, 300, 0.41]] as const) expect(binomialPmf(k, n, p)).toBeCloseTo(jStat.binomial.pdf(k, n, p), 10);
    // jStat.hypgeom.pdf(k, population, successes, draws)
    for (const [k, s, f, d] of [[1, 4, 4, 4], [3, 10, 30, 12], [40, 300, 9700, 1500]] as const) {
      expect(hypergeometricPmf(k, s, f, d)).toBeCloseTo(jStat.hypgeom.pdf(k, s + f, s, d), 10);
    }
  });
});

describe("Welch's t-test", () => {
  // Student's (1908) sleep data, as R ships it; t.test(extra ~ group, data = sleep) prints
  // t = -1.8608, df = 17.776, p-value = 0.07939, 95 % CI -3.3654832 to 0.2054832 (values from memory of R's output).
  const group1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
  const group2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
  const c = welch(group1, group2);
  it('reproduces the published sleep-data result (after − before, so the signs are R’s reversed)', () => {
    expect(c.effect.value).toBeCloseTo(1.58, 10);
    expect(c.p).toBeCloseTo(0.07939, 4);
    expect(c.effect.interval[0]).toBeCloseTo(-0.2054832, 5);
    expect(c.effect.interval[1]).toBeCloseTo(3.3654832, 5);
  });
  it('matches the textbook formula computed here with jStat', () => {
    const v1 = jStat.variance(group1, true);
    const v2 = jStat.variance(group2, true);
    const se = Math.sqrt(v1 / 10 + v2 / 10);
    const df = (v1 / 10 + v2 / 10) ** 2 / ((v1 / 10) ** 2 / 9 + (v2 / 10) ** 2 / 9);
    expect(df).toBeCloseTo(17.776, 3);
    expect(c.p).toBeCloseTo(2 * (1 - jStat.studentt.cdf(1.58 / se, df)), 7);
  });
  it('says when more periods after the change cannot settle it: here the 10 points before are already too uncertain', () => {
    // Hand: 80 % power at 5 % two-sided needs the difference to reach 2.80 standard errors (z 0.975 + z 0.80),
    // i.e. SE ≤ 1.58 / 2.8016 = 0.564; the before side alone gives √(s₁²/10) = √(3.2 / 10) = 0.566.
    expect(Math.sqrt(jStat.variance(group1, true) / 10)).toBeGreaterThan(1.58 / (1.959964 + 0.841621));
    expect(c.morePeriods).toBeNull();
  });
  it('otherwise gives the smallest number of further periods that brings the difference to 2.80 standard errors', () => {
    const before = Array.from({ length: 40 }, (_, i) => (i % 2 === 0 ? 1 : -1)); // s² = 40/39
    const after = [0.8 + 1, 0.8 - 1, 0.8 + 1, 0.8 - 1, 0.8]; // mean 0.8, s² = 4/4 = 1
    const k = welch(before, after).morePeriods!;
    const se = (extra: number) => Math.sqrt(40 / 39 / 40 + 1 / (5 + extra));
    expect(0.8 / se(k)).toBeGreaterThanOrEqual(2.8016);
    expect(0.8 / se(k - 1)).toBeLessThan(2.8016);
    // Solving 1/(5 + k) ≤ (0.8/2.8016)² − 1/39 by hand: k ≥ 1/0.05589 − 5 = 12.9, so 13.
    expect(k).toBe(13);
  });
});

describe("Fisher's exact test", () => {
  it("Fisher's tea-tasting table (3 1 / 1 3) has two-sided p = 34/70 = 0.4857 (Fisher 1935; R's fisher.test example)", () => {
    const c = proportions({ defectives: 3, inspected: 4, periods: 1 }, { defectives: 1, inspected: 4, periods: 1 });
    // Hand: P(k) = C(4,k)·C(4,4−k)/C(8,4) = 1, 16, 36, 16, 1 over 70; outcomes no likelier than 16/70 sum to 34/70.
    expect(c.p).toBeCloseTo(34 / 70, 12);
  });
  it('agrees with the hypergeometric sum from jStat on a large table', () => {
    const before = { defectives: 180, inspected: 12000, periods: 20 };
    const after = { defectives: 60, inspected: 6000, periods: 10 };
    const c = proportions(before, after);
    const d = 240;
    const pObs = jStat.hypgeom.pdf(60, 18000, d, 6000);
    let p = 0;
    for (let k = 0; k <= d; k++) {
      const q = jStat.hypgeom.pdf(k, 18000, d, 6000);
      if (q <= pObs * (1 + 1e-7)) p += q;
    }
    expect(c.p).toBeCloseTo(p, 8);
    expect(c.effect.value).toBeCloseTo(0.01 - 0.015, 12);
  });
});

describe('exact test of two Poisson rates', () => {
  it("R's poisson.test(c(11, 21), c(800, 3011)) comparison: rate ratio 1.971, p = 0.07967 (values from memory of R's documentation example)", () => {
    const c = poissonRates({ count: 21, exposure: 3011, periods: 3 }, { count: 11, exposure: 800, periods: 1 });
    expect(c.effect.value).toBeCloseTo(11 / 800 / (21 / 3011), 10);
    expect(c.effect.value).toBeCloseTo(1.971488, 5);
    expect(c.p).toBeCloseTo(0.07967, 4);
  });
  it('is the conditional binomial test, checked term by term with jStat', () => {
    const before = { count: 40, exposure: 52, periods: 13 };
    const after = { count: 6, exposure: 20, periods: 5 };
    const c = poissonRates(before, after);
    const n = 46;
    const share = 20 / 72;
    const obs = jStat.binomial.pdf(6, n, share);
    let p = 0;
    for (let k = 0; k <= n; k++) if (jStat.binomial.pdf(k, n, share) <= obs * (1 + 1e-7)) p += jStat.binomial.pdf(k, n, share);
    expect(c.p).toBeCloseTo(p, 10);
    // The rate-ratio interval from the Clopper–Pearson bounds of 6 of 46: θ/(1−θ)·(A₁/A₂).
    const lo = jStat.beta.inv(0.025, 6, 41);
    expect(c.effect.interval[0]).toBeCloseTo((lo / (1 - lo)) * (52 / 20), 6);
  });
});

describe('the minimum-likelihood p-value without listing the support', () => {
  // The definition written out: sum every outcome no more likely than the observed one (R's convention, 1e-7 relative tolerance).
  const byEnumeration = (pmf: number[], observed: number) => {
    const limit = pmf[observed]! * (1 + 1e-7);
    return Math.min(1, pmf.filter((q) => q <= limit).reduce((s, q) => s + q, 0));
  };
  it('equals the enumeration for binomial and hypergeometric tables, every observed count', async () => {
    const { binomialPmf, hypergeometricPmf, minLikelihoodUnimodalP } = await import('../../src/stats/distributions.ts');
    for (const [n, p] of [[10, 0.5], [25, 0.13], [60, 0.9], [200, 0.02]] as const) {
      const pmf = Array.from({ length: n + 1 }, (_, k) => binomialPmf(k, n, p));
      const mode = Math.floor((n + 1) * p);
      for (let x = 0; x <= n; x++) expect(minLikelihoodUnimodalP((k) => binomialPmf(k, n, p), 0, n, mode, x)).toBeCloseTo(byEnumeration(pmf, x), 12);
    }
    for (const [succ, fail, draws] of [[8, 12, 10], [30, 300, 50], [4, 96, 20]] as const) {
      const lo = Math.max(0, draws - fail);
      const hi = Math.min(succ, draws);
      const pmf = Array.from({ length: hi + 1 }, (_, k) => (k < lo ? 0 : hypergeometricPmf(k, succ, fail, draws)));
      const mode = Math.floor(((draws + 1) * (succ + 1)) / (succ + fail + 2));
      for (let x = lo; x <= hi; x++) expect(minLikelihoodUnimodalP((k) => hypergeometricPmf(k, succ, fail, draws), lo, hi, mode, x)).toBeCloseTo(byEnumeration(pmf, x), 12);
    }
  });
  it('handles counts in the hundreds of millions without listing them (found by fuzzing: it ran out of memory)', async () => {
    const { poissonRates } = await import('../../src/stats/compare.ts');
    const c = poissonRates({ count: 739_009_120, exposure: 10, periods: 10 }, { count: 30, exposure: 10, periods: 10 });
    expect(c.p).toBe(0);
    const even = poissonRates({ count: 50_000_000, exposure: 1, periods: 1 }, { count: 50_000_000, exposure: 1, periods: 1 });
    expect(even.p).toBeCloseTo(1, 6);
  });
});
