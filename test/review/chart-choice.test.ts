/**
 * `chart: auto` for counts and the reader's checks on the new fields.
 * Expected values by hand: a c or u chart's lower limit is above 0 only when
 * more than 9 events are expected a period (c̄ − 3√c̄ > 0 ⇔ c̄ > 9,
 * REFERENCE §1.3 [calc]).
 */
import { describe, expect, it } from 'vitest';
import { readReview } from '../../src/workspace/review-file.ts';
import { assess, assessed, pointsCsv } from '../helpers/in-memory.ts';

describe('chart: auto', () => {
  it('keeps a c chart when more than 9 events are expected a period', () => {
    const a = assessed(assess({ chart: 'auto', better: 'lower', csv: pointsCsv('date,count', [12, 9, 14, 11, 10, 13, 8, 12].map((c) => [c])) }));
    expect(a.characteristic.chart).toBe('c');
    expect(a.characteristic.chosen).toMatch(/chose a c chart: about 11\.1 events a period/);
  });
  it('keeps a u chart, per its `per`, when an exposure column is given and counts are high', () => {
    const a = assessed(assess({ chart: 'auto', better: 'lower', per: 1000, csv: pointsCsv('date,count,exposure', [[20, 2000], [25, 2100], [18, 1900], [22, 2050], [19, 2000]]) }));
    expect(a.characteristic.chart).toBe('u');
    expect(a.location.values[0]).toBeCloseTo(10, 12);
  });
  it('draws a g chart of the periods between events when fewer than 9 are expected, spreading a period’s events evenly', () => {
    // Counts by period: 0 1 0 0 2 0 1. Events sit at period midpoints (1.5; 4.25 and 4.75; 6.5),
    // so the gaps are 4.25 − 1.5 = 2.75, 0.5 and 6.5 − 4.75 = 1.75 periods (by hand).
    const a = assessed(assess({ chart: 'auto', better: 'lower', csv: pointsCsv('date,count', [0, 1, 0, 0, 2, 0, 1].map((c) => [c])) }));
    expect(a.characteristic.chart).toBe('g');
    expect(a.characteristic.better).toBe('higher');
    expect(a.location.values).toEqual([2.75, 0.5, 1.75]);
    expect(a.samples.map((s) => s.label)).toEqual(['5', '5 #2', '7']);
    expect(a.notes.lines[0]).toMatch(/chose a g chart: about 0\.57 events a period/);
  });
  it('measures gaps in exposure (hours worked) for rate data', () => {
    // 1 event in 40,000 h, none in 42,000 h, 1 in 41,000 h: from mid-period to mid-period, 20,000 + 42,000 + 20,500 h.
    const a = assessed(assess({ chart: 'auto', better: 'lower', csv: pointsCsv('date,count,exposure', [[1, 40000], [0, 42000], [1, 41000]]) }));
    expect(a.characteristic.chart).toBe('g');
    expect(a.location.values).toEqual([82500]);
    expect(a.characteristic.unit).toBe('exposure between events');
  });
});

describe('review.yaml: per, customers and gap charts', () => {
  const head = 'title: T\nperiod: {from: 2026-01-01, to: 2026-01-31}\n';
  it('per belongs to rate charts only', () => {
    const r = readReview(`${head}characteristics:\n  - {id: a, name: A, chart: c, data: a.csv, better: lower, per: 200000}\n`);
    expect(r.diagnostics.map((d) => [d.ruleId, d.line])).toEqual([['review/per', 4]]);
  });
  it('per must be a positive number', () => {
    const r = readReview(`${head}characteristics:\n  - {id: a, name: A, chart: u, data: a.csv, better: lower, per: -5}\n`);
    expect(r.diagnostics[0]!.message).toMatch(/"characteristics\[0\]\.per" must be a number above 0/);
  });
  it('customers maps tags to names', () => {
    const r = readReview(`${head}customers: {harbour: Harbour Ltd}\ncharacteristics:\n  - {id: a, name: A, chart: auto, data: a.csv, better: lower}\n`);
    expect(r.diagnostics).toEqual([]);
    expect(r.config!.customers).toEqual({ harbour: 'Harbour Ltd' });
    expect(r.config!.characteristics[0]!.chart).toBe('auto');
  });
  it('a chart that is not a family names the choices, auto among them', () => {
    const r = readReview(`${head}characteristics:\n  - {id: a, name: A, chart: h, data: a.csv, better: lower}\n`);
    expect(r.diagnostics[0]!.message).toMatch(/"h" is not a chart family; use one of individuals, .*laney-p, laney-u, g, t, or auto for counts/);
  });
});
