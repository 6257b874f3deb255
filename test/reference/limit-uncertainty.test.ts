/**
 * Uncertainty of estimated limits: the exact standard deviation of MR̄/d2
 * (moving ranges correlated through their shared points) against the
 * simulated figures of REFERENCE §4 (20 000 simulated baselines), against a
 * seeded simulation here, and the R̄/d2 formula against the textbook
 * d3/(d2√m).
 */
import { describe, expect, it } from 'vitest';
import { constants } from '../../src/stats/constants.ts';
import { family } from '../../src/stats/index.ts';
import { ADJACENT_MR_COVARIANCE, limitUncertainty, movingRangeSigmaCV } from '../../src/stats/limit-uncertainty.ts';
import type { Sample } from '../../src/model.ts';
import { normals } from '../helpers/random.ts';

describe('SD of σ̂/σ for σ̂ = MR̄/d2 over k individual values', () => {
  it('the covariance of adjacent moving ranges is 2σ²·(2/π)(√(1−¼) + ½·arcsin ½ − 1) = 0.1627σ² (bivariate normal, ρ = −½)', () => {
    expect(ADJACENT_MR_COVARIANCE).toBeCloseTo(0.16272, 4);
  });
  it('matches the REFERENCE §4 simulation (20 000 baselines) for k = 10 … 1000', () => {
    for (const [k, sd] of [[10, 0.298], [20, 0.208], [25, 0.185], [50, 0.129], [100, 0.091], [300, 0.053], [1000, 0.029]] as const) {
      // The table's figures are simulated to 3 decimals: about ±0.002 for 20 000 runs.
      expect(Math.abs(movingRangeSigmaCV(k) - sd), `k = ${k}`).toBeLessThan(0.004);
    }
  });
  it('matches a seeded simulation of 4000 baselines of 20 points', () => {
    const z = normals(2026);
    const sig: number[] = [];
    for (let r = 0; r < 4000; r++) {
      const x = Array.from({ length: 20 }, () => z());
      let mr = 0;
      for (let i = 1; i < 20; i++) mr += Math.abs(x[i]! - x[i - 1]!);
      sig.push(mr / 19 / 1.128379);
    }
    const m = sig.reduce((s, v) => s + v, 0) / sig.length;
    const sd = Math.sqrt(sig.reduce((s, v) => s + (v - m) ** 2, 0) / (sig.length - 1));
    // SE of a sample SD from 4000 draws is about sd/√8000 ≈ 0.0023.
    expect(Math.abs(sd - movingRangeSigmaCV(20))).toBeLessThan(0.008);
  });
});

describe('limit uncertainty through the family', () => {
  const measurements = (values: number[][]): Sample[] =>
    values.map((v, i) => ({ label: String(i + 1), date: `2026-01-${String(i + 1).padStart(2, '0')}`, line: i + 2, observation: { kind: 'measurements', values: v } }));
  it('Xbar-R: SE(UCL) = √(σ²/N + 9·(σ·d3/(d2√m))²/n) for m subgroups of n (delta method by hand)', () => {
    const z = normals(9);
    const samples = measurements(Array.from({ length: 25 }, () => Array.from({ length: 5 }, () => 10 + z())));
    const fam = family('xbar-r');
    const basis = samples.map((_, i) => i);
    const limits = fam.fromData(samples, basis);
    const u = limitUncertainty(fam, samples, basis, limits)!;
    const k = constants(5);
    const sigma = limits.estimate.sigma!;
    const expected = Math.sqrt(sigma ** 2 / 125 + (9 * (sigma * (k.d3 / (k.d2 * 5))) ** 2) / 5);
    expect(u.uclSE[0]).toBeCloseTo(expected, 6);
    expect(u.sigmaCV).toBeCloseTo(k.d3 / (k.d2 * 5), 12);
    // Quesenberry (1993): 400/(n − 1) subgroups.
    expect(u.enoughPoints).toBe(100);
  });
  it('c chart: SE(UCL) = (1 + 3/(2√c̄))·√(c̄/k) (delta method by hand)', () => {
    const counts = [4, 6, 5, 7, 3, 5, 6, 4, 5, 5];
    const samples: Sample[] = counts.map((c, i) => ({ label: String(i + 1), date: `2026-02-${String(i + 1).padStart(2, '0')}`, line: i + 2, observation: { kind: 'count', count: c } }));
    const fam = family('c');
    const basis = samples.map((_, i) => i);
    const u = limitUncertainty(fam, samples, basis, fam.fromData(samples, basis))!;
    expect(u.uclSE[0]).toBeCloseTo((1 + 3 / (2 * Math.sqrt(5))) * Math.sqrt(5 / 10), 6);
    expect(u.enoughPoints).toBeUndefined();
  });
});
