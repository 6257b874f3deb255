/**
 * g and t charts for rare events, against their published definitions and
 * hand computation:
 *
 * - g chart (Kaminsky, Benneyan, Davis & Burke 1992, JQT 24(2):63–69;
 *   Benneyan 2001, Health Care Management Science 4:305–318, from memory via
 *   REFERENCE §1.5): p̂ = 1/(ḡ + 1); probability limits are geometric
 *   quantiles k_q = ⌈ln(1−q)/ln(1−p̂) − 1⌉ at q = 0.00135, 0.5, 0.99865; the
 *   3-sigma upper limit for comparison is ḡ + 3√(ḡ(ḡ+1)). Each quantile is
 *   checked here against the geometric distribution function itself,
 *   1 − (1−p)^(k+1), written out in the test.
 * - t chart (Nelson 1994, JQT 26(3):239–240): y = t^(1/3.6), individuals limits
 *   on y, carried back by ^3.6. Nelson's exponent makes exponential times
 *   nearly symmetric: the skewness of Y = X^(1/3.6) for exponential X, from
 *   E[Y^j] = Γ(1 + j/3.6) computed with jStat's gamma function, is below 0.001.
 */
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { geometricQuantile } from '../../src/stats/g.ts';
import { T_EXPONENT } from '../../src/stats/t.ts';
import { assess, assessed, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';

const geometricCdf = (k: number, p: number) => 1 - (1 - p) ** (k + 1);

describe('g chart: probability limits with a median center line', () => {
  // Twenty gaps (days between events), invented; ḡ = 400/20 = 20 by hand.
  const GAPS = [12, 31, 5, 44, 20, 8, 27, 15, 3, 38, 22, 9, 17, 26, 11, 30, 6, 19, 35, 22];
  it('the invented gaps sum to 400, so ḡ = 20 and p̂ = 1/21', () => expect(GAPS.reduce((a, b) => a + b, 0)).toBe(400));

  const a = assessed(assess({ chart: 'g', better: 'higher', csv: pointsCsv('date,between', GAPS.map((g) => [g])) }));
  const l = a.location.limits[0]!;
  const est = a.baselines[0]!.limits!.estimate;

  it('p̂ = 1/(ḡ + 1) and the 3-sigma upper limit ḡ + 3√(ḡ(ḡ+1)) = 20 + 3√420 = 81.482 (by hand)', () => {
    expect(est.gBar).toBe(20);
    expect(est.pHat).toBeCloseTo(1 / 21, 12);
    expect(est.ucl3Sigma).toBeCloseTo(20 + 3 * Math.sqrt(420), 9);
    expect(est.ucl3Sigma).toBeCloseTo(81.482, 3);
  });

  it('center line = median 14, UCL = 135, LCL = 0: each the smallest k with F(k) ≥ q, checked on the distribution function', () => {
    // By hand: ln(0.5)/ln(20/21) − 1 = 14.21 − 1 → 14; ln(0.00135)/ln(20/21) − 1 = 135.43 − 1 → 135.
    expect(l.center).toBe(14);
    expect(l.ucl).toBe(135);
    expect(l.lcl).toBe(0);
    const p = 1 / 21;
    for (const [q, k] of [[0.5, 14], [0.99865, 135]] as const) {
      expect(geometricCdf(k, p)).toBeGreaterThanOrEqual(q);
      expect(geometricCdf(k - 1, p)).toBeLessThan(q);
    }
  });

  it('the median approaches ln 2 · mean for large means (REFERENCE §1.5, calc)', () => {
    const mean = 5000;
    expect(geometricQuantile(0.5, 1 / (mean + 1)) / mean).toBeCloseTo(Math.LN2, 3);
  });

  it('a gap above the upper limit is an improvement the chart can signal, which a c chart with a lower limit of 0 cannot', () => {
    // Limits frozen on the twenty gaps above (UCL 135), then a gap of 160.
    const ledger = ledgerCsv([`2020-02-01,x,freeze,20,Stable over 20 gaps,A`]);
    const b = assessed(assess({ chart: 'g', better: 'higher', csv: pointsCsv('date,between', [...GAPS, 160].map((g) => [g])), ledger }));
    const hit = b.location.signals.find((s) => s.rule === 'beyond-limits');
    expect(hit?.side).toBe('above');
    expect(b.samples[hit!.flagged[0]!]!.label).toBe('21');
  });

  it('review.yaml may not call shorter gaps better', async () => {
    const { readReview } = await import('../../src/workspace/review-file.ts');
    const r = readReview('title: T\nperiod: {from: 2026-01-01, to: 2026-01-31}\ncharacteristics:\n  - {id: g, name: G, chart: g, data: g.csv, better: lower}\n');
    expect(r.diagnostics.map((d) => [d.ruleId, d.line])).toEqual([['review/better', 4]]);
    expect(r.diagnostics[0]!.message).toMatch(/longer is better: set better: higher/);
  });
});

describe('t chart: Nelson’s power transformation', () => {
  it('t^(1/3.6) makes exponential times nearly symmetric: skewness from Γ(1 + j/3.6) (jStat) is below 0.001', () => {
    const m = (j: number) => jStat.gammafn(1 + j * T_EXPONENT);
    const v = m(2) - m(1) ** 2;
    const skew = (m(3) - 3 * m(1) * v - m(1) ** 3) / v ** 1.5;
    expect(Math.abs(skew)).toBeLessThan(0.001);
  });

  // Events on these dates: the intervals are 8, 11, 0 (two on one day), 25, 6, 38, 3, 23 and 35 days.
  const EVENTS = ['2026-01-01', '2026-01-09', '2026-01-20', '2026-01-20', '2026-02-14', '2026-02-20', '2026-03-30', '2026-04-02', '2026-04-25', '2026-05-30'];
  const DAYS = [8, 11, 0, 25, 6, 38, 3, 23, 35];
  const a = assessed(assess({ chart: 't', better: 'higher', csv: `date\n${EVENTS.join('\n')}\n` }));

  it('reads one row per event and plots the days since the event before; same-day events are told apart', () => {
    expect(a.location.values).toEqual(DAYS);
    expect(a.samples.map((s) => s.label)).toEqual(['2026-01-09', '2026-01-20', '2026-01-20 #2', '2026-02-14', '2026-02-20', '2026-03-30', '2026-04-02', '2026-04-25', '2026-05-30']);
  });

  it('limits: ȳ ± 3·MR̄y/1.128 on y = t^(1/3.6), carried back by ^3.6 with the lower limit at 0 (recomputed here step by step)', () => {
    const y = DAYS.map((t) => t ** (1 / 3.6));
    const yBar = y.reduce((s, v) => s + v, 0) / y.length;
    const mr = y.slice(1).map((v, i) => Math.abs(v - y[i]!));
    const sigma = mr.reduce((s, v) => s + v, 0) / mr.length / (2 / Math.sqrt(Math.PI));
    const l = a.location.limits[0]!;
    expect(l.center).toBeCloseTo(yBar ** 3.6, 9);
    expect(l.ucl).toBeCloseTo((yBar + 3 * sigma) ** 3.6, 9);
    expect(l.lcl).toBe(Math.max(0, yBar - 3 * sigma) ** 3.6);
    expect(l.transform).toEqual({ kind: 'power', exponent: 1 / 3.6 });
  });

  it('a standard mean time θ gives y its exponential mean θ^k·Γ(1+k) and sigma θ^k·√(Γ(1+2k) − Γ(1+k)²) (jStat gamma)', () => {
    const theta = 10;
    const s = assessed(assess({ chart: 't', better: 'higher', standard: { kind: 'attributes', center: theta }, csv: `date\n${EVENTS.join('\n')}\n` }));
    const k = 1 / 3.6;
    const yBar = theta ** k * jStat.gammafn(1 + k);
    const sigma = theta ** k * Math.sqrt(jStat.gammafn(1 + 2 * k) - jStat.gammafn(1 + k) ** 2);
    expect(s.location.limits[0]!.center).toBeCloseTo(yBar ** 3.6, 8);
    // jStat's gamma is good to about 1e-9 relative; the difference Γ(1+2k) − Γ(1+k)² loses a few digits more.
    expect(s.location.limits[0]!.ucl).toBeCloseTo((yBar + 3 * sigma) ** 3.6, 4);
  });

  it('points are judged on the y scale: the upper limit lies 3 sigmas of y above the center, a point of 1 day at (1 − ȳ)/σy', async () => {
    const { zScore } = await import('../../src/signals/evaluate.ts');
    const l = a.location.limits[0]!;
    expect(zScore(l.ucl, l)).toBeCloseTo(3, 9);
    expect(zScore(1, l)).toBeCloseTo((1 - l.center ** (1 / 3.6)) / l.sigma, 12);
  });
});
