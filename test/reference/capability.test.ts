/**
 * Capability and performance indices with their intervals, the normality
 * test, and when the pack withholds them.
 *
 * - Cp interval with chi-square quantiles (Montgomery, Introduction to
 *   Statistical Quality Control, ch. 8, from memory); REFERENCE §6 check value
 *   [calc]: Ĉp 1.15, N 20 → [0.7874, 1.5122]; cross-checked with jStat.
 * - Cpk interval, Bissell 1990 (Applied Statistics 39:331–340):
 *   REFERENCE §6 check value [calc] for the textbook set-up USL 100, LSL 90,
 *   N 30, x̄ 97, s 1.6 → Cpk 0.625, [0.4248, 0.8252]; and a published worked
 *   example: Quality Digest, May 2000, "The Last Word": Cpk 1.15 from n = 45,
 *   "95-percent confident that it's between 0.89 and 1.41".
 * - Anderson–Darling with estimated mean and sigma: the p-value
 *   approximation (D'Agostino & Stephens 1986, Table 4.9, from memory) meets
 *   their published critical values of A* — 0.631 (10 %), 0.752 (5 %),
 *   1.035 (1 %) (Table 4.7, from memory) — and A² is recomputed here with
 *   jStat's normal distribution function.
 */
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { bissellInterval, capability, cpInterval } from '../../src/stats/capability.ts';
import { andersonDarling, andersonDarlingP } from '../../src/stats/normality.ts';
import { assess, assessed, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';
import { mulberry32, normals } from '../helpers/random.ts';

/** `n` values with exactly the given mean and sample SD. */
function exactly(n: number, mean: number, sd: number, seed: number): number[] {
  const z = normals(seed);
  const raw = Array.from({ length: n }, () => z());
  const m = raw.reduce((s, x) => s + x, 0) / n;
  const s = Math.sqrt(raw.reduce((t, x) => t + (x - m) ** 2, 0) / (n - 1));
  return raw.map((x) => mean + ((x - m) / s) * sd);
}

describe('interval formulas against their check values', () => {
  it('Cp 1.15 on N = 20: [0.7874, 1.5122] (REFERENCE §6), equal to Ĉp·√(χ²(q; 19)/19) with jStat quantiles', () => {
    const [lo, hi] = cpInterval(1.15, 20);
    expect(lo).toBeCloseTo(0.7874, 4);
    expect(hi).toBeCloseTo(1.5122, 4);
    expect(lo).toBeCloseTo(1.15 * Math.sqrt(jStat.chisquare.inv(0.025, 19) / 19), 8);
    expect(hi).toBeCloseTo(1.15 * Math.sqrt(jStat.chisquare.inv(0.975, 19) / 19), 8);
  });
  it('Quality Digest (May 2000): Cpk 1.15 from n = 45 → 0.89 to 1.41', () => {
    const [lo, hi] = bissellInterval(1.15, 45);
    expect(lo).toBeCloseTo(0.89, 2);
    expect(hi).toBeCloseTo(1.41, 2);
  });
  it('USL 100, LSL 90, N 30, x̄ 97, s 1.6: Cpk = min(3, 7)/4.8 = 0.625, Bissell [0.4248, 0.8252] (REFERENCE §6)', () => {
    const values = exactly(30, 97, 1.6, 3);
    const f = capability({ lower: 90, upper: 100 }, values, 97, 1.6)!;
    expect(f.cpk.value).toBeCloseTo(0.625, 12);
    expect(f.cpk.interval[0]).toBeCloseTo(0.4248, 4);
    expect(f.cpk.interval[1]).toBeCloseTo(0.8252, 4);
    // The same values' overall SD is 1.6, so Ppk equals Cpk here; Cp = 10/9.6.
    expect(f.ppk.value).toBeCloseTo(0.625, 10);
    expect(f.cp!.value).toBeCloseTo(10 / 9.6, 12);
  });
  it('parts per million outside the specification from the normal model (jStat normal cdf)', () => {
    const f = capability({ lower: 90, upper: 100 }, exactly(30, 97, 1.6, 3), 97, 1.6)!;
    const expected = (jStat.normal.cdf(90, 97, 1.6) + 1 - jStat.normal.cdf(100, 97, 1.6)) * 1e6;
    expect(f.ppmWithin).toBeCloseTo(expected, 4);
    // By a normal table: Φ(−1.875) = 0.030396 above, Φ(−4.375) = 0.000006 below.
    expect(f.ppmWithin).toBeCloseTo(30402, -1);
  });
  it('a one-sided specification has no Cp or Pp, and Cpk from the one side', () => {
    const f = capability({ upper: 100 }, exactly(30, 97, 1.6, 3), 97, 1.6)!;
    expect(f.cp).toBeNull();
    expect(f.pp).toBeNull();
    expect(f.cpk.value).toBeCloseTo(3 / 4.8, 12);
  });
});

describe('Anderson–Darling normality test', () => {
  it('the p-value approximation meets the published critical values 0.631, 0.752 and 1.035', () => {
    expect(andersonDarlingP(0.631)).toBeCloseTo(0.1, 2);
    expect(andersonDarlingP(0.752)).toBeCloseTo(0.05, 2);
    expect(andersonDarlingP(1.035)).toBeCloseTo(0.01, 2);
  });
  it('A² recomputed with jStat’s normal cdf on ten values, and A* = A²(1 + 0.75/n + 2.25/n²)', () => {
    const xs = [9.8, 10.4, 10.1, 9.6, 10.9, 10.0, 9.7, 10.3, 10.2, 11.6];
    const n = xs.length;
    const m = xs.reduce((s, x) => s + x, 0) / n;
    const sd = Math.sqrt(xs.reduce((s, x) => s + (x - m) ** 2, 0) / (n - 1));
    const f = [...xs].sort((a, b) => a - b).map((x) => jStat.normal.cdf(x, m, sd));
    let sum = 0;
    for (let i = 0; i < n; i++) sum += (2 * i + 1) * (Math.log(f[i]) + Math.log(1 - f[n - 1 - i]));
    const a2 = -n - sum / n;
    const r = andersonDarling(xs)!;
    expect(r.statistic).toBeCloseTo(a2, 8);
    expect(r.adjusted).toBeCloseTo(a2 * (1 + 0.75 / n + 2.25 / (n * n)), 8);
  });
  it('rejects about 5 % of normal samples at the 5 % level and most exponential ones (seeded, 1000 samples of 30)', () => {
    const z = normals(77);
    const u = mulberry32(78);
    let normalRejected = 0;
    let exponentialRejected = 0;
    for (let r = 0; r < 1000; r++) {
      if (!andersonDarling(Array.from({ length: 30 }, () => z()))!.normal) normalRejected++;
      if (!andersonDarling(Array.from({ length: 30 }, () => -Math.log(1 - u())))!.normal) exponentialRejected++;
    }
    expect(normalRejected / 1000).toBeGreaterThan(0.035);
    expect(normalRejected / 1000).toBeLessThan(0.065);
    expect(exponentialRejected / 1000).toBeGreaterThan(0.9);
  });
});

describe('capability in the engine', () => {
  // Seed 32 draws a stable series; with the four Western Electric rules on both panels about one in three
  // seeds of 30 normal values shows a false alarm, which would rightly withhold capability.
  const z = normals(32);
  const values = Array.from({ length: 30 }, () => 10 + 0.2 * z());
  const spec = { lower: 9.2, upper: 10.8 };
  it('individuals: within sigma MR̄/1.128, overall sigma the sample SD, N − 1 degrees of freedom', () => {
    const a = assessed(assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])), freezeAfter: 100, spec }));
    const c = a.capability;
    if (c?.status !== 'reported') throw new Error('expected capability');
    const mean = values.reduce((s, v) => s + v, 0) / 30;
    const mr = values.slice(1).map((v, i) => Math.abs(v - values[i]!));
    const within = mr.reduce((s, v) => s + v, 0) / 29 / 1.1283791670955126;
    const overall = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / 29);
    expect(c.figures.sigmaWithin).toBeCloseTo(within, 12);
    expect(c.figures.sigmaOverall).toBeCloseTo(overall, 12);
    expect(c.figures.cp!.value).toBeCloseTo(1.6 / (6 * within), 12);
    expect(c.figures.ppk.value).toBeCloseTo(Math.min(10.8 - mean, mean - 9.2) / (3 * overall), 12);
    expect(c.figures.values).toBe(30);
    expect(c.notes.some((n) => /fewer than 100/.test(n))).toBe(true);
  });
  it('is withheld while a signal is unexplained, and reported once it is reviewed', () => {
    const spiked = values.map((v, i) => (i === 25 ? 12 : v));
    const csv = pointsCsv('date,value', spiked.map((v) => [v]));
    const open = assessed(assess({ chart: 'individuals', csv, freezeAfter: 100, spec }));
    expect(open.capability?.status).toBe('withheld');
    expect(open.capability?.status === 'withheld' && open.capability.reason).toMatch(/unexplained signals \(at "26"/);
    const reviewed = assessed(assess({ chart: 'individuals', csv, freezeAfter: 100, spec, ledger: ledgerCsv(['2020-03-01,x,reviewed,26,Probe slipped; re-measured,A']) }));
    expect(reviewed.capability?.status).toBe('reported');
  });
  it('does not apply to attribute charts or without a specification', () => {
    expect(assessed(assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])) })).capability).toBeNull();
    expect(assessed(assess({ chart: 'c', csv: pointsCsv('date,count', [[3], [4], [2], [5], [3], [4]]), spec })).capability).toBeNull();
  });
});
