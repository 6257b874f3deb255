/**
 * A moving range is the difference between a point and the one before it, so
 * a cause recorded for either point explains a moving range beyond its limit.
 * Hand computation: a ±0.3 zigzag about 10 has moving ranges of 0.6, so the
 * MR chart's UCL is D4 · 0.6 = 3.267 · 0.6 ≈ 1.96 and the individuals UCL is
 * 10 + 3 · 0.6 / 1.128 ≈ 11.6. A single reading of 13 at point 10 is beyond
 * it, and so are the moving ranges into it and out of it (3.3 and 3.3).
 */
import { describe, expect, it } from 'vitest';
import { assess, assessed, isoDay, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';

const values = Array.from({ length: 16 }, (_, i) => (i === 9 ? 13 : 10 + (i % 2 === 0 ? 0.3 : -0.3)));
const run = (ledger: string[]) =>
  assessed(assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])), ledger: ledgerCsv([`${isoDay(8)},x,freeze,8,Stable,Q`, ...ledger]) }));

describe('explained signals on the moving-range chart', () => {
  it('without a ledger entry, the spike and both moving ranges around it are unexplained: investigate', () => {
    const a = run([]);
    const mr = a.dispersion!.signals.filter((s) => s.rule === 'beyond-limits');
    expect(mr.flatMap((s) => s.flagged)).toEqual([9, 10]);
    expect(mr.every((s) => !s.explained)).toBe(true);
    expect(a.recommendation.action).toBe('investigate');
  });
  it('a reviewed entry at the spike explains it and both moving ranges that include it: keep', () => {
    const a = run([`${isoDay(20)},x,reviewed,10,Sampling valve left open,Q`]);
    expect(a.location.signals.every((s) => s.explained)).toBe(true);
    expect(a.dispersion!.signals.filter((s) => s.rule === 'beyond-limits').every((s) => s.explained)).toBe(true);
    expect(a.recommendation.action).toBe('keep');
  });
});
