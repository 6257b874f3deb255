/**
 * The change-point estimate on seeded simulated shifts at a known point:
 * how often the estimate lands within ±2 points of the truth. The floors
 * asserted below sit under the measured rates (printed by the test and
 * quoted in README) by about two binomial standard errors of 200 runs
 * (√(0.25/200) ≈ 0.035), so they catch a real loss of accuracy, not noise;
 * the runs are seeded, so the measured figures are exact and repeatable.
 */
import { describe, expect, it } from 'vitest';
import { estimateChangePoint } from '../../src/stats/change-point.ts';
import { mulberry32, normals } from '../helpers/random.ts';

const N = 40;
const TRUE_AT = 25; // the first point of the new level
const RUNS = 200;

function normalRate(shift: number, seed: number) {
  const z = normals(seed);
  let near = 0;
  let significant = 0;
  for (let r = 0; r < RUNS; r++) {
    const values = Array.from({ length: N }, (_, i) => z() + (i >= TRUE_AT ? shift : 0));
    const est = estimateChangePoint({ kind: 'normal', values }, r + 1)!;
    if (Math.abs(est.at - TRUE_AT) <= 2) near++;
    if (est.significance >= 0.95) significant++;
  }
  return { near: near / RUNS, significant: significant / RUNS };
}

describe('change-point estimate on simulated shifts in the mean (σ = 1, 40 points, shift at point 26)', () => {
  const measured: Record<string, { near: number; significant: number }> = {};
  for (const [shift, floor] of [
    // Measured (seeded, 200 runs each): 62.0 %, 84.0 %, 93.0 % within ±2 points.
    [1, 0.55],
    [1.5, 0.77],
    [2, 0.86],
  ] as const) {
    it(`a ${shift}σ shift is found within ±2 points in at least ${floor * 100}% of runs`, () => {
      const m = normalRate(shift, 1000 + shift * 10);
      measured[shift] = m;
      console.log(`shift ${shift}σ: within ±2 points ${(m.near * 100).toFixed(1)}%, significant at 0.95 ${(m.significant * 100).toFixed(1)}%`);
      expect(m.near).toBeGreaterThanOrEqual(floor);
    });
  }
  it('finds bigger shifts more often', () => {
    expect(measured[1.5]!.near).toBeGreaterThan(measured[1]!.near);
    expect(measured[2]!.near).toBeGreaterThanOrEqual(measured[1.5]!.near);
  });
  it('with no shift at all, calls one significant at 0.95 in about 5% of runs (the size of the permutation test)', () => {
    const z = normals(77);
    let significant = 0;
    for (let r = 0; r < RUNS; r++) {
      const est = estimateChangePoint({ kind: 'normal', values: Array.from({ length: N }, () => z()) }, r + 1)!;
      if (est.significance >= 0.95) significant++;
    }
    // Binomial(200, 0.05): mean 10, sd 3.1; accept 2 to 20.
    expect(significant).toBeGreaterThanOrEqual(2);
    expect(significant).toBeLessThanOrEqual(20);
  });
});

describe('change-point estimate on counts', () => {
  it('a Poisson rate doubling from 4 to 8 a period with varying exposure is found within ±2 points in most runs', () => {
    const u = mulberry32(5);
    const poisson = (mean: number) => {
      const limit = Math.exp(-mean);
      let k = 0;
      for (let p = u(); p > limit; p *= u()) k++;
      return k;
    };
    let near = 0;
    for (let r = 0; r < RUNS; r++) {
      const exposures = Array.from({ length: N }, () => 0.5 + u());
      const counts = exposures.map((e, i) => poisson(e * (i >= TRUE_AT ? 8 : 4)));
      const est = estimateChangePoint({ kind: 'poisson', counts, exposures }, r + 1)!;
      if (Math.abs(est.at - TRUE_AT) <= 2) near++;
    }
    console.log(`Poisson 4 → 8: within ±2 points ${((near / RUNS) * 100).toFixed(1)}%`);
    // Measured: 86.5 % (seeded, 200 runs).
    expect(near / RUNS).toBeGreaterThanOrEqual(0.8);
  });
  it('a binomial proportion step is located by the likelihood: hand example', () => {
    // 0 of 100 in each of the first 5 samples, 10 of 100 in the last 5: the split must be at the 6th sample,
    // and the interval cannot include a split that mixes a zero sample into the new level.
    const est = estimateChangePoint({ kind: 'binomial', defectives: [0, 0, 0, 0, 0, 10, 10, 10, 10, 10], inspected: Array(10).fill(100) })!;
    expect(est.at).toBe(5);
    expect(est.before).toBe(0);
    expect(est.after).toBeCloseTo(0.1, 12);
    expect(est.interval).toEqual([5, 5]);
    expect(est.significance).toBeGreaterThan(0.99);
  });
});

describe('the curtailed permutation test', () => {
  // Curtailed sampling: stopping once the share below cannot reach the decision level any more
  // cannot change the decision (a bound, by hand: with k of B reorderings at or above the observed
  // statistic, the full share is at most (B − k)/B). Checked here against full runs on the same seeds.
  const series = (r: number, shift: number) => {
    const z = normals(900 + r);
    return { kind: 'normal' as const, values: Array.from({ length: N }, (_, i) => z() + (i >= TRUE_AT ? shift : 0)) };
  };
  it('decides at 0.95 as the full test does, and is the full test whenever it does not stop', () => {
    let stopped = 0;
    let drawn = 0;
    let agreeSignificant = 0;
    for (let r = 0; r < 300; r++) {
      const s = series(r, r % 3 === 0 ? 1 : 0);
      const full = estimateChangePoint(s, r + 1)!;
      const cut = estimateChangePoint(s, r + 1, 0.95)!;
      expect(full.permutations).toBe(999);
      expect(cut.planned).toBe(999);
      expect(cut.significance >= 0.95).toBe(full.significance >= 0.95);
      if (cut.permutations < cut.planned) {
        stopped++;
        // Stopped at the first moment the bound fell below 0.95: k = 50 reorderings reached the statistic.
        expect(cut.permutations - Math.round(cut.significance * cut.permutations)).toBe(50);
        expect(cut.significance).toBeLessThan(0.95);
      } else {
        expect(cut).toEqual(full);
      }
      if (full.significance >= 0.95) agreeSignificant++;
      drawn += cut.permutations;
    }
    // Mostly no shift, and a 1σ shift a third of the time: most runs are unremarkable and stop early.
    expect(stopped).toBeGreaterThan(150);
    expect(agreeSignificant).toBeGreaterThan(20);
    console.log(`curtailed: ${stopped} of 300 stopped early; ${(drawn / 300).toFixed(0)} reorderings a run on average (999 in full)`);
  });
});
