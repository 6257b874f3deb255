/**
 * Incidence rates per 200,000 hours worked, with exact Poisson intervals.
 *
 * - The incidence-rate formula of occupational safety statistics: cases ×
 *   200,000 / hours worked by all employees, 200,000 h being 100 full-time
 *   workers × 40 h × 50 weeks (US Bureau of Labor Statistics, "How to compute
 *   a firm's incidence rate"; REFERENCE §7, the regulator's fact sheet checked
 *   there).
 * - The exact (Garwood 1936) interval [χ²(α/2; 2C)/(2A), χ²(1−α/2; 2C+2)/(2A)]
 *   with chi-square quantiles from jStat, and REFERENCE §6's check value
 *   [calc]: 5 cases in 580,400 h → 1.7229 per 200,000 h, 95 % [0.5594, 4.0208].
 */
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import { chiSquareQuantile, poissonRateInterval } from '../../src/stats/distributions.ts';
import { assess, assessed, pointsCsv } from '../helpers/in-memory.ts';

describe('exact Poisson rate interval', () => {
  it('REFERENCE §6 check value: 5 cases in 580,400 h → 1.7229 per 200,000 h, 95% [0.5594, 4.0208]', () => {
    const area = 580400 / 200000;
    expect(5 / area).toBeCloseTo(1.7229, 4);
    const [lo, hi] = poissonRateInterval(5, area);
    expect(lo).toBeCloseTo(0.5594, 4);
    expect(hi).toBeCloseTo(4.0208, 4);
  });
  it('agrees with jStat’s chi-square quantiles for counts 0 to 40', () => {
    for (const c of [0, 1, 2, 3, 7, 15, 40]) {
      const [lo, hi] = poissonRateInterval(c, 2.5);
      expect(lo).toBeCloseTo(c === 0 ? 0 : jStat.chisquare.inv(0.025, 2 * c) / 5, 6);
      expect(hi).toBeCloseTo(jStat.chisquare.inv(0.975, 2 * c + 2) / 5, 6);
    }
  });
  it('chi-square quantiles agree with jStat across degrees of freedom', () => {
    for (const df of [1, 2, 5, 19, 29, 100]) for (const q of [0.005, 0.025, 0.5, 0.975, 0.995]) expect(chiSquareQuantile(q, df)).toBeCloseTo(jStat.chisquare.inv(q, df), 6);
  });
});

describe('a u chart with per: 200000 and hours worked as exposure', () => {
  // Monthly recordable cases and hours worked (invented).
  const MONTHS: [number, number][] = [[1, 40000], [0, 42000], [2, 41000], [1, 39000], [0, 40500], [1, 41000], [3, 40000], [0, 38000]];
  const a = assessed(assess({ chart: 'u', better: 'lower', per: 200000, csv: pointsCsv('date,count,exposure', MONTHS) }));

  it('plots each month’s incidence rate, cases × 200,000 / hours (BLS formula, by hand)', () => {
    MONTHS.forEach(([c, h], i) => expect(a.location.values[i]).toBeCloseTo((c * 200000) / h, 9));
  });
  it('the baseline rate is total cases × 200,000 / total hours, with its exact interval (jStat)', () => {
    const cases = 8;
    const hours = 321500;
    const b = a.rates!.baseline!;
    expect(b.count).toBe(cases);
    expect(b.exposure).toBe(hours);
    expect(b.rate).toBeCloseTo((cases * 200000) / hours, 9);
    expect(b.interval[0]).toBeCloseTo(jStat.chisquare.inv(0.025, 16) / 2 / (hours / 200000), 6);
    expect(b.interval[1]).toBeCloseTo(jStat.chisquare.inv(0.975, 18) / 2 / (hours / 200000), 6);
  });
  it('limits are ū ± 3√(ū/aᵢ) with aᵢ = hours/200,000 (REFERENCE §7)', () => {
    const u = (8 * 200000) / 321500;
    const l = a.location.limits[0]!;
    expect(l.center).toBeCloseTo(u, 9);
    expect(l.ucl).toBeCloseTo(u + 3 * Math.sqrt(u / (40000 / 200000)), 9);
    expect(l.lcl).toBe(0);
  });
  it('says that the lower limit is 0, so an improvement shows only as a run, and suggests a g or t chart', () => {
    const d = a.diagnostics.find((x) => x.ruleId === 'chart/low-counts');
    expect(d?.severity).toBe('info');
    expect(d?.message).toMatch(/lower limit is 0/);
    expect(d?.message).toMatch(/g chart .* or a t chart/);
    expect(a.notes.lines.some((l) => /per 200,000 units of exposure/.test(l) && /Bureau of Labor Statistics/.test(l))).toBe(true);
  });
});
