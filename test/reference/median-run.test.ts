/**
 * The same-side run rule on small counts, by seeded simulation.
 *
 * Nominal: for a symmetric continuous process, 8 successive points on one
 * side (either side) come on average every 2^8 − 1 = 255 points — the mean
 * wait for a run of 8 equal outcomes of a fair coin (a standard result on
 * runs; from memory). REFERENCE §1.3 [calc]: with Poisson mean 1.21,
 * P(below the mean) = 0.66 (checked here with jStat) and 8 in a row below
 * the mean come every ≈ 79 points.
 *
 * plumbline judges such counts against each point's median and counts runs
 * in probability (src/signals/median-line.ts). These simulations run the
 * real rule over long in-control Poisson series and measure the mean spacing
 * of run signals (a new signal whenever a new run fires), for means from
 * 0.5 to 6 — all with a lower limit of 0. The accepted band, half to twice
 * the nominal 255, is ours (common practice, no source): the rule is
 * conservative by design where counts cannot split evenly around a median,
 * and the ordinary mean-line rule at 1.21 is outside it by a factor of three.
 */
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { medianSide } from '../../src/signals/median-line.ts';
import type { RulePoint } from '../../src/signals/rule.ts';
import { run8OneSide } from '../../src/signals/rules/run-one-side.ts';
import { mulberry32, normals } from '../helpers/random.ts';

const NOMINAL = 2 ** 8 - 1;
const POINTS = 300_000;

/** Poisson draws by inversion of jStat's distribution function (a table up to far in the tail). */
function poissonDraws(mean: number, n: number, seed: number): number[] {
  const cdf: number[] = [];
  for (let k = 0; k < 60; k++) cdf.push(jStat.poisson.cdf(k, mean));
  const u = mulberry32(seed);
  return Array.from({ length: n }, () => {
    const v = u();
    let k = 0;
    while (k < cdf.length - 1 && cdf[k]! < v) k++;
    return k;
  });
}

/** Mean number of points per run signal: one signal each time a new run (a new start) fires. */
function spacing(points: readonly RulePoint[], side?: 'above' | 'below'): number {
  const starts = new Set(run8OneSide.detect(points).filter((h) => side === undefined || h.side === side).map((h) => h.start));
  return points.length / starts.size;
}

function medianPoints(counts: readonly number[], mean: number): RulePoint[] {
  const table = new Map<number, ReturnType<typeof medianSide>>();
  return counts.map((c) => {
    if (!table.has(c)) table.set(c, medianSide({ kind: 'poisson', count: c, mean }));
    const r = table.get(c)!;
    return { z: (c - mean) / Math.sqrt(mean), beyond: null, run: { side: r.side, p: r.p } };
  });
}

const meanPoints = (counts: readonly number[], mean: number): RulePoint[] => counts.map((c) => ({ z: (c - mean) / Math.sqrt(mean), beyond: null }));

describe('the nominal rate, on symmetric data', () => {
  it(`normal points signal a run of 8 every ≈ ${NOMINAL} points (within 8 %)`, () => {
    const z = normals(2024);
    const pts = Array.from({ length: POINTS }, () => ({ z: z(), beyond: null }));
    expect(spacing(pts) / NOMINAL).toBeGreaterThan(0.92);
    expect(spacing(pts) / NOMINAL).toBeLessThan(1.08);
  });
  it('with every side probability 1/2 the rule in probability is exactly 8 in a row', () => {
    const pts: RulePoint[] = Array.from({ length: 9 }, () => ({ z: -1, beyond: null, run: { side: 'below', p: 0.5 } }));
    expect(run8OneSide.detect(pts).map((h) => h.at)).toEqual([7, 8]);
  });
});

describe('small Poisson counts', () => {
  it('REFERENCE §1.3: at mean 1.21, P(below the mean) = 0.659 and P(on 1) = 0.361 (jStat)', () => {
    expect(jStat.poisson.cdf(1, 1.21)).toBeCloseTo(0.659, 3);
    expect(jStat.poisson.pdf(1, 1.21)).toBeCloseTo(0.361, 3);
  });

  it('against the mean, 8 below in a row come every ≈ 79 points at mean 1.21 (REFERENCE §1.3), a third of the nominal rate', () => {
    const pts = meanPoints(poissonDraws(1.21, POINTS, 7), 1.21);
    const below = spacing(pts, 'below');
    // One-sided formula (1 − p⁸)/((1 − p)p⁸) with p = 0.659: 79.7.
    expect(below).toBeGreaterThan(70);
    expect(below).toBeLessThan(90);
    expect(spacing(pts) / NOMINAL).toBeLessThan(0.4);
  });

  for (const [mean, seed] of [[0.5, 11], [0.8, 12], [1.21, 13], [2, 14], [3.5, 15], [6, 16]] as const) {
    it(`against the median and counted in probability, mean ${mean}: a run signal every half to twice ${NOMINAL} points`, () => {
      const ratio = spacing(medianPoints(poissonDraws(mean, POINTS, seed), mean)) / NOMINAL;
      expect(ratio).toBeGreaterThan(0.5);
      expect(ratio).toBeLessThan(2);
    });
  }

  it('a real drop still signals: mean 1.21 falling to 0.3 is flagged within a few dozen points', () => {
    const before = poissonDraws(1.21, 100, 21);
    const after = poissonDraws(0.3, 100, 22);
    const pts = medianPoints([...before, ...after], 1.21);
    const first = run8OneSide.detect(pts).find((h) => h.at >= 100 && h.side === 'below');
    expect(first).toBeDefined();
    expect(first!.at - 100).toBeLessThan(40);
  });
});
