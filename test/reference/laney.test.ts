/**
 * Laney's p′ and u′ charts and the overdispersion check.
 *
 * - Laney 2002 (Quality Engineering 14(4):531–537; formulas via REFERENCE
 *   §1.4, from memory): zᵢ = (pᵢ − p̄)/σᵢ, σz = MR̄(z)/1.128, limits
 *   p̄ ± 3σᵢσz. Recomputed here by hand on a five-day table.
 * - Simulated data where the answer is known (seeded): beta-binomial counts
 *   have Var(x/n) = p(1−p)/n · [1 + (n−1)ρ] with ρ = 1/(α+β+1), so σz should
 *   be near √(1 + (n−1)ρ); gamma-Poisson counts with shape k have
 *   Var = μ + μ²/k, so σz near √(1 + μ/k). Plain binomial and Poisson data
 *   should rarely be called overdispersed.
 */
import { describe, expect, it } from 'vitest';
import { checkDispersion } from '../../src/stats/overdispersion.ts';
import { laneyP } from '../../src/stats/laney.ts';
import type { Sample } from '../../src/model.ts';
import { assess, assessed, pointsCsv } from '../helpers/in-memory.ts';
import { mulberry32, normals } from '../helpers/random.ts';

describe('Laney p′ by hand', () => {
  const DAYS: [number, number][] = [[520, 100000], [610, 120000], [450, 95000], [700, 110000], [480, 105000]];
  const samples: Sample[] = DAYS.map(([d, n], i) => ({ label: String(i + 1), date: `2026-01-0${i + 1}`, line: i + 2, observation: { kind: 'proportion', defectives: d, inspected: n } }));
  it('p̄ = Σd/Σn, z from the binomial sigma, σz = MR̄(z)/1.128, limits p̄ ± 3σᵢσz', () => {
    const pBar = (520 + 610 + 450 + 700 + 480) / (100000 + 120000 + 95000 + 110000 + 105000);
    const sig = DAYS.map(([, n]) => Math.sqrt((pBar * (1 - pBar)) / n));
    const z = DAYS.map(([d, n], i) => (d / n - pBar) / sig[i]!);
    const mr = [1, 2, 3, 4].map((i) => Math.abs(z[i]! - z[i - 1]!));
    const sz = (mr[0]! + mr[1]! + mr[2]! + mr[3]!) / 4 / 1.1283791670955126;
    const l = laneyP.fromData(samples, [0, 1, 2, 3, 4]);
    expect(l.estimate.pBar).toBeCloseTo(pBar, 14);
    expect(l.estimate.sigmaZ).toBeCloseTo(sz, 10);
    DAYS.forEach((_, i) => {
      expect(l.location[i]!.ucl).toBeCloseTo(pBar + 3 * sig[i]! * sz, 12);
      expect(l.location[i]!.lcl).toBeCloseTo(Math.max(0, pBar - 3 * sig[i]! * sz), 12);
    });
    // σz far above 1: this table is overdispersed.
    expect(sz).toBeGreaterThan(2);
  });
  it('σz = 1 gives back the ordinary p chart (the z-scores of two points a binomial-sigma apart)', async () => {
    const { p } = await import('../../src/stats/p.ts');
    // Two points at p̄ ∓ d2/2 binomial sigmas: their z-scores differ by d2 = 1.128, so σz = MR̄(z)/1.128 = 1.
    const n = 10000;
    const pBar = 0.01;
    const s = Math.sqrt((pBar * (1 - pBar)) / n);
    const half = 1.1283791670955126 / 2;
    const two: Sample[] = [pBar - half * s, pBar + half * s].map((v, i) => ({
      label: String(i),
      date: `2026-01-0${i + 1}`,
      line: i,
      observation: { kind: 'proportion', defectives: v * n, inspected: n },
    }));
    const l = laneyP.fromData(two, [0, 1]);
    expect(l.estimate.sigmaZ).toBeCloseTo(1, 9);
    expect(l.location[0]!.ucl).toBeCloseTo(p.fromData(two, [0, 1]).location[0]!.ucl, 12);
  });
});

/** Marsaglia–Tsang gamma(shape, 1) from the seeded generator. */
function gammaDraw(shape: number, u: () => number, z: () => number): number {
  if (shape < 1) return gammaDraw(shape + 1, u, z) * u() ** (1 / shape);
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    const x = z();
    const v = (1 + c * x) ** 3;
    if (v <= 0) continue;
    if (Math.log(u()) < 0.5 * x * x + d - d * v + d * Math.log(v)) return d * v;
  }
}
function binomialDraw(n: number, p: number, u: () => number): number {
  let k = 0;
  for (let i = 0; i < n; i++) if (u() < p) k++;
  return k;
}
function poissonDraw(mean: number, u: () => number): number {
  const limit = Math.exp(-mean);
  let k = 0;
  for (let q = u(); q > limit; q *= u()) k++;
  return k;
}

describe('the overdispersion check on simulated data (seeded)', () => {
  const N = 2000;
  const P = 0.02;
  const DAYS = 30;

  it('beta-binomial (α = 20, β = 980, so ρ = 1/1001): recommends laney-p and σz is near √(1 + (n−1)ρ) = 1.73', () => {
    const u = mulberry32(5);
    const z = normals(6);
    const expected = Math.sqrt(1 + (N - 1) / 1001);
    let recommended = 0;
    const ratios: number[] = [];
    for (let rep = 0; rep < 40; rep++) {
      const rows = Array.from({ length: DAYS }, () => {
        const a = gammaDraw(20, u, z);
        const b = gammaDraw(980, u, z);
        return [binomialDraw(N, a / (a + b), u), N];
      });
      const a = assessed(assess({ chart: 'p', better: 'lower', csv: pointsCsv('date,defectives,inspected', rows), freezeAfter: 100 }));
      if (a.dispersionCheck!.recommend) recommended++;
      ratios.push(a.dispersionCheck!.sigmaZ / expected);
    }
    const meanRatio = ratios.reduce((s, r) => s + r, 0) / ratios.length;
    expect(meanRatio).toBeGreaterThan(0.85);
    expect(meanRatio).toBeLessThan(1.15);
    expect(recommended).toBeGreaterThanOrEqual(30);
  });

  it('plain binomial data: σz near 1 and laney-p recommended in at most 2 of 40 data sets', () => {
    const u = mulberry32(9);
    let recommended = 0;
    let sum = 0;
    for (let rep = 0; rep < 40; rep++) {
      const rows = Array.from({ length: DAYS }, () => [binomialDraw(N, P, u), N]);
      const a = assessed(assess({ chart: 'p', better: 'lower', csv: pointsCsv('date,defectives,inspected', rows), freezeAfter: 100 }));
      if (a.dispersionCheck!.recommend) recommended++;
      sum += a.dispersionCheck!.sigmaZ;
    }
    expect(recommended).toBeLessThanOrEqual(2);
    expect(sum / 40).toBeGreaterThan(0.85);
    expect(sum / 40).toBeLessThan(1.15);
  });

  it('gamma-Poisson (mean 400 per day, shape 50): laney-u recommended, σz near √(1 + 400/50) = 3', () => {
    const u = mulberry32(13);
    const z = normals(14);
    const ratios: number[] = [];
    let recommended = 0;
    for (let rep = 0; rep < 40; rep++) {
      const rows = Array.from({ length: DAYS }, () => [poissonDraw((400 * gammaDraw(50, u, z)) / 50, u), 1]);
      const a = assessed(assess({ chart: 'u', better: 'lower', csv: pointsCsv('date,count,exposure', rows), freezeAfter: 100 }));
      if (a.dispersionCheck!.recommend) recommended++;
      ratios.push(a.dispersionCheck!.sigmaZ / 3);
      // The laney-u chart on the same data widens its limits by that σz.
      const l = assessed(assess({ chart: 'laney-u', better: 'lower', csv: pointsCsv('date,count,exposure', rows), freezeAfter: 100 }));
      expect(l.baselines[0]!.limits!.estimate.sigmaZ).toBeCloseTo(a.dispersionCheck!.sigmaZ, 12);
    }
    const meanRatio = ratios.reduce((s, r) => s + r, 0) / ratios.length;
    expect(meanRatio).toBeGreaterThan(0.85);
    expect(meanRatio).toBeLessThan(1.15);
    expect(recommended).toBe(40);
  });

  it('the dispersion ratio is Pearson’s chi-square over its degrees of freedom (by hand on three z-scores)', () => {
    const d = checkDispersion([1, -2, 2])!;
    expect(d.chiSquare).toBe(9);
    expect(d.df).toBe(2);
    expect(d.ratio).toBe(4.5);
    // P(χ²₂ ≥ 9) = e^(−9/2) for two degrees of freedom (exponential tail).
    expect(d.p).toBeCloseTo(Math.exp(-4.5), 12);
    // σz = mean(|−2 − 1|, |2 − (−2)|)/1.128 = 3.5/1.1284.
    expect(d.sigmaZ).toBeCloseTo(3.5 / 1.1283791670955126, 12);
  });
});
