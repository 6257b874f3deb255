/**
 * In-control average run length (ARL0) by seeded simulation, independent
 * standard normal points judged against known limits (center 0, sigma 1).
 *
 * - 3-sigma limits alone: ARL0 = 1/P(|Z| > 3) = 1/0.0026998 = 370.4 (exact;
 *   Montgomery, Introduction to Statistical Quality Control, ch. 5–6).
 * - The four Western Electric zone rules together: ARL0 = 91.75 (Champ &
 *   Woodall 1987, Technometrics 29(4):393–399, by Markov chain; figure taken
 *   from memory as quoted in REFERENCE.md §3).
 *
 * Run lengths are nearly geometric, so their SD is close to their mean and
 * the standard error of the mean of R runs is about ARL0/√R. The tolerances
 * are four standard errors; the seeds are fixed, so the test is repeatable.
 */
import { describe, expect, it } from 'vitest';
import { rulePoint } from '../../src/signals/evaluate.ts';
import type { Rule, RulePoint } from '../../src/signals/rule.ts';
import { rulesFor } from '../../src/signals/rule-sets.ts';
import { normals } from '../helpers/random.ts';

const LIMITS = { center: 0, sigma: 1, ucl: 3, lcl: -3 };

/** Points until the first signal of any of `rules`, for one simulated process. */
function runLength(rules: readonly Rule[], draw: () => number): number {
  const points: RulePoint[] = [];
  for (let size = 256; ; size *= 2) {
    while (points.length < size) points.push(rulePoint(draw(), LIMITS));
    let first = Infinity;
    for (const r of rules) for (const h of r.detect(points)) if (h.at < first) first = h.at;
    if (first < Infinity) return first + 1;
  }
}

function averageRunLength(rules: readonly Rule[], runs: number, seed: number) {
  const draw = normals(seed);
  let sum = 0;
  let sumSq = 0;
  for (let i = 0; i < runs; i++) {
    const l = runLength(rules, draw);
    sum += l;
    sumSq += l * l;
  }
  const mean = sum / runs;
  const sd = Math.sqrt(sumSq / runs - mean * mean);
  return { mean, se: sd / Math.sqrt(runs) };
}

describe('in-control false-alarm rates', () => {
  it('beyond-limits alone: ARL0 near 370.4', () => {
    const rules = rulesFor(['beyond-limits'], 'variables');
    const { mean, se } = averageRunLength(rules, 6000, 20261201);
    console.log(`ARL0 beyond-limits: ${mean.toFixed(1)} ± ${se.toFixed(1)} (6000 runs)`);
    expect(Math.abs(mean - 370.4)).toBeLessThan(4 * se);
    expect(se).toBeLessThan(6);
  });
  it('the four Western Electric rules together: ARL0 near 91.75', () => {
    const rules = rulesFor('western-electric', 'variables');
    const { mean, se } = averageRunLength(rules, 12000, 7);
    console.log(`ARL0 western-electric: ${mean.toFixed(2)} ± ${se.toFixed(2)} (12000 runs)`);
    expect(Math.abs(mean - 91.75)).toBeLessThan(4 * se);
    expect(se).toBeLessThan(1);
  });
});
