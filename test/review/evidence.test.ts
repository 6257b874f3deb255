/**
 * The evidence in the recommendation: exclusion impact worked by hand, and
 * the recorded-change paths (a proven improvement re-baselines without any
 * run rule; too few points or no difference yet keeps the limits and says
 * why). Expected values are computed in the test from the definitions.
 */
import { describe, expect, it } from 'vitest';
import { assess, assessed, isoDay, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';

describe('exclusion impact', () => {
  // Ten values; the seventh (13.0) is excluded with a cause.
  const values = [10, 10.4, 9.6, 10.2, 9.8, 10.0, 13, 10.1, 9.9, 10.3];
  const a = assessed(
    assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])), ledger: ledgerCsv([`${isoDay(20)},x,exclude,7,Probe not zeroed,Q`]) }),
  );
  const limitsOf = (xs: number[]) => {
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
    const mrs = xs.slice(1).map((x, i) => Math.abs(x - xs[i]!));
    // d2 for n = 2 is E|X₁ − X₂|/σ = 2/√π exactly.
    const sigma = mrs.reduce((s, x) => s + x, 0) / mrs.length / (2 / Math.sqrt(Math.PI));
    return { center: mean, ucl: mean + 3 * sigma, lcl: mean - 3 * sigma, sigma };
  };
  it('moves each limit by the difference between limits with and without the point, in sigmas and percent', () => {
    const without = limitsOf(values.filter((_, i) => i !== 6));
    const withIt = limitsOf(values);
    const x = a.evidence.exclusions[0]!;
    expect(x.effect).toBe('moved');
    for (const m of x.moves) {
      expect(m.without).toBeCloseTo(without[m.limit], 10);
      expect(m.with).toBeCloseTo(withIt[m.limit], 10);
      expect(m.sigmas).toBeCloseTo((withIt[m.limit] - without[m.limit]) / without.sigma, 10);
      expect(m.percent!).toBeCloseTo(((withIt[m.limit] - without[m.limit]) / without[m.limit]) * 100, 10);
    }
    // Putting a 3-unit outlier back widens the limits a lot: the upper limit rises by more than one sigma.
    expect(x.moves.find((m) => m.limit === 'ucl')!.sigmas).toBeGreaterThan(1);
  });
  it('says an exclusion after the freeze point cannot move frozen limits', () => {
    const b = assessed(
      assess({
        chart: 'individuals',
        csv: pointsCsv('date,value', values.map((v) => [v])),
        ledger: ledgerCsv([`${isoDay(5)},x,freeze,6,Stable,Q`, `${isoDay(20)},x,exclude,7,Probe not zeroed,Q`]),
      }),
    );
    expect(b.evidence.exclusions[0]!.effect).toBe('after-basis');
  });
});

describe('a recorded change with the evidence of a test', () => {
  // A c chart: 20 weeks near 6 (c̄ = 125/20 = 6.25), ending above the center so that no run reaches
  // back from the points after the change; then a recorded change and fewer stoppages after it.
  const before = [6, 5, 7, 6, 8, 5, 6, 7, 4, 6, 7, 5, 6, 8, 6, 5, 7, 6, 7, 8];
  const run = (after: number[]) =>
    assessed(
      assess({
        chart: 'c',
        better: 'lower',
        csv: pointsCsv('date,count', [...before, ...after].map((c) => [c])),
        ledger: ledgerCsv([`${isoDay(19)},x,freeze,20,Stable,Q`, `${isoDay(21)},x,change,21,New lubrication schedule,Q`]),
      }),
    );
  it('re-baselines at the recorded change once it shows a significant improvement, before any run rule fires', () => {
    const a = run([2, 3, 1, 2, 2, 3]);
    // Six points after the change: too few for 8-on-one-side; c̄ = 6.25 puts the LCL at 0, so no point is beyond it.
    expect(a.location.signals.filter((s) => s.flagged.some((i) => i >= 20))).toEqual([]);
    const t = a.evidence.changeTests[0]!;
    expect(t.comparison.method).toBe('exact-poisson-rates');
    expect(t.comparison.before).toBeCloseTo(125 / 20, 12);
    expect(t.comparison.after).toBeCloseTo(13 / 6, 12);
    expect(t.significant).toBe(true);
    expect(t.better).toBe(true);
    expect(a.recommendation.action).toBe('re-baseline');
    expect(a.recommendation.ledger[0]).toMatch(/,x,baseline,21,Process change: New lubrication schedule,/);
    expect(a.recommendation.reasons[0]).toMatch(/made a significant difference in the better direction: rate 6\.250 → 2\.167/);
  });
  it('with fewer points after the change than minPoints, keeps the limits and says when to re-baseline', () => {
    const a = run([2, 1, 2]);
    expect(a.recommendation.action).toBe('keep');
    expect(a.recommendation.reasons.join(' ')).toMatch(/fewer than the 5 a new baseline needs/);
  });
  it('with no difference yet, keeps the limits and says how many more periods would typically show one', () => {
    const a = run([5, 6, 5, 6, 5]);
    expect(a.evidence.changeTests[0]!.significant).toBe(false);
    expect(a.recommendation.action).toBe('keep');
    expect(a.recommendation.reasons.join(' ')).toMatch(/no significant difference yet/);
  });
});

describe('the change-point estimate in a recommendation', () => {
  it('an unexplained persistent shift to the worse side is investigated, with the estimated point and its interval', () => {
    const values = Array.from({ length: 40 }, (_, i) => (i % 2 === 0 ? 10.2 : 9.8) + (i >= 28 ? 1.2 : 0) + ((i * 7) % 5) * 0.05);
    const a = assessed(
      assess({ chart: 'individuals', better: 'lower', csv: pointsCsv('date,value', values.map((v) => [v])), ledger: ledgerCsv([`${isoDay(22)},x,freeze,20,Stable,Q`]) }),
    );
    expect(a.recommendation.action).toBe('investigate');
    const cp = a.evidence.changePoint!;
    // The values were built with the step at the 29th point (index 28).
    expect(cp.index).toBe(28);
    expect(cp.interval[0]).toBeLessThanOrEqual(28);
    expect(cp.interval[1]).toBeGreaterThanOrEqual(28);
    expect(cp.significance).toBeGreaterThan(0.99);
    expect(a.recommendation.reasons.join(' ')).toMatch(/The level changed most likely at "29"/);
  });
});
