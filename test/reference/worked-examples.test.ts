/**
 * Published worked examples, run through the whole engine (CSV text → limits
 * and signals). Sources, from memory (the raw data reproduce the printed
 * totals, which is a check on the transcription):
 *
 * - Montgomery, Introduction to Statistical Quality Control, Example 7.1
 *   (frozen orange juice cans, 30 samples of n = 50): Σd = 347, p̄ = 0.2313,
 *   UCL 0.4102, LCL 0.0524; samples 15 and 23 exceed the UCL and have
 *   assignable causes; without them p̄ = 0.2150, UCL 0.3893, LCL 0.0407, and
 *   sample 21 then lies above the revised UCL with no cause found.
 * - Montgomery, same book, Example 7.3 (nonconformities on printed circuit
 *   boards, 26 samples): Σc = 516, c̄ = 19.85, UCL 33.22, LCL 6.48; samples 6
 *   and 20 are outside; without them c̄ = 19.67, UCL 32.97, LCL 6.36.
 * - Montgomery, same book, Example 6.1 (piston-ring diameters, 25 subgroups
 *   of 5): X̿ = 74.001, R̄ = 0.023, X chart limits 73.988 and 74.014, R chart
 *   UCL 0.049 — checked here through the constants from the summary values.
 */
import { describe, expect, it } from 'vitest';
import { constants } from '../../src/stats/constants.ts';
import { assess, assessed, isoDay, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';

const JUICE = [12, 15, 8, 10, 4, 7, 16, 9, 14, 10, 5, 6, 17, 12, 22, 8, 10, 5, 13, 11, 20, 18, 24, 15, 9, 12, 7, 13, 9, 6];
const BOARDS = [21, 24, 16, 12, 15, 5, 28, 20, 31, 25, 20, 24, 16, 19, 10, 17, 13, 22, 18, 39, 30, 24, 16, 19, 17, 15];

describe('Montgomery Example 7.1, p chart', () => {
  const csv = pointsCsv('date,defectives,inspected', JUICE.map((d) => [d, 50]));
  it('the transcribed data reproduce the printed total of 347 nonconforming cans', () => {
    expect(JUICE.reduce((a, b) => a + b, 0)).toBe(347);
  });
  it('trial limits on all 30 samples: p̄ 0.2313, UCL 0.4102, LCL 0.0524; samples 15 and 23 beyond', () => {
    const a = assessed(assess({ chart: 'p', csv, freezeAfter: 40 }));
    const l = a.location.limits[0]!;
    expect(l.center).toBeCloseTo(0.2313, 4);
    expect(l.ucl).toBeCloseTo(0.4102, 4);
    expect(l.lcl).toBeCloseTo(0.0524, 4);
    const beyond = a.location.signals.filter((s) => s.rule === 'beyond-limits').map((s) => a.samples[s.flagged[0]!]!.label);
    expect(beyond).toEqual(['15', '23']);
  });
  it('excluding 15 and 23 with their causes: p̄ 0.2150, UCL 0.3893, LCL 0.0407; 21 is then above the UCL', () => {
    const ledger = ledgerCsv([
      `${isoDay(30)},x,exclude,15,New batch of cardboard stock,QA`,
      `${isoDay(30)},x,exclude,23,Inexperienced operator on the machine,QA`,
    ]);
    const a = assessed(assess({ chart: 'p', csv, ledger, freezeAfter: 40 }));
    const l = a.location.limits[0]!;
    expect(l.center).toBeCloseTo(0.215, 4);
    expect(l.ucl).toBeCloseTo(0.3893, 4);
    expect(l.lcl).toBeCloseTo(0.0407, 4);
    const open = a.location.signals.filter((s) => !s.explained).map((s) => `${s.rule}@${a.samples[s.flagged[0]!]!.label}`);
    expect(open).toEqual(['beyond-limits@21']);
    expect(a.recommendation.action).toBe('investigate');
  });
});

describe('Montgomery Example 7.3, c chart', () => {
  const csv = pointsCsv('date,count', BOARDS.map((c) => [c]));
  it('the transcribed data reproduce the printed total of 516 nonconformities', () => {
    expect(BOARDS.reduce((a, b) => a + b, 0)).toBe(516);
  });
  it('trial limits: c̄ 19.85, UCL 33.22, LCL 6.48; sample 6 below and 20 above', () => {
    const a = assessed(assess({ chart: 'c', csv }));
    const l = a.location.limits[0]!;
    expect(l.center).toBeCloseTo(19.85, 2);
    // The book rounds c̄ to 19.85 before adding 3√c̄ (33.216 → 33.22); unrounded it is 33.211.
    expect(Math.abs(l.ucl - 33.22)).toBeLessThan(0.01);
    expect(l.lcl).toBeCloseTo(6.48, 2);
    const beyond = a.location.signals.filter((s) => s.rule === 'beyond-limits').map((s) => [a.samples[s.flagged[0]!]!.label, s.side]);
    expect(beyond).toEqual([
      ['6', 'below'],
      ['20', 'above'],
    ]);
  });
  it('revised limits without samples 6 and 20: c̄ 19.67, UCL 32.97, LCL 6.36', () => {
    const ledger = ledgerCsv([`${isoDay(26)},x,exclude,6,Inspector error,QA`, `${isoDay(26)},x,exclude,20,Wave-soldering problem,QA`]);
    const l = assessed(assess({ chart: 'c', csv, ledger })).location.limits[0]!;
    expect(l.center).toBeCloseTo(19.67, 2);
    expect(l.ucl).toBeCloseTo(32.97, 2);
    expect(l.lcl).toBeCloseTo(6.36, 2);
  });
});

describe('Montgomery Example 6.1, Xbar-R limits from the summary values', () => {
  it('74.001 ± A2(5)·0.023 prints as 73.988 / 74.014; D4(5)·0.023 as 0.049', () => {
    const k = constants(5);
    expect(74.001 + k.A2 * 0.023).toBeCloseTo(74.014, 3);
    expect(74.001 - k.A2 * 0.023).toBeCloseTo(73.988, 3);
    expect(k.D4 * 0.023).toBeCloseTo(0.049, 3);
  });
});

describe('hand computations shown in full', () => {
  it('individuals: x = 10, 12, 11, 13, 9 → x̄ 11, MR̄ (2+1+2+4)/4 = 2.25, σ̂ 2.25/1.128379, limits 11 ± 3σ̂; MR UCL 3.2665·2.25', () => {
    const csv = pointsCsv('date,value', [[10], [12], [11], [13], [9]]);
    const a = assessed(assess({ chart: 'individuals', csv }));
    const sigma = 2.25 / (2 / Math.sqrt(Math.PI));
    expect(a.location.limits[0]!.center).toBeCloseTo(11, 12);
    expect(a.location.limits[0]!.ucl).toBeCloseTo(11 + 3 * sigma, 10);
    expect(a.location.limits[0]!.lcl).toBeCloseTo(11 - 3 * sigma, 10);
    expect(a.dispersion!.limits[0]!.center).toBeCloseTo(2.25, 10);
    expect(a.dispersion!.limits[0]!.ucl).toBeCloseTo(3.2665 * 2.25, 3);
    expect(a.dispersion!.limits[0]!.lcl).toBe(0);
    expect(a.dispersion!.values).toEqual([null, 2, 1, 2, 4]);
  });
  it('u chart with unequal exposure: ū = Σc/Σa = 12/600 = 0.02; limits ū ± 3√(ū/aᵢ), LCL floored at 0', () => {
    const csv = pointsCsv('date,count,exposure', [[2, 100], [4, 200], [1, 50], [3, 150], [2, 100]]);
    const a = assessed(assess({ chart: 'u', csv }));
    const expectUcl = (ai: number) => 0.02 + 3 * Math.sqrt(0.02 / ai);
    a.samples.forEach((s, i) => {
      const ai = s.observation.kind === 'rate' ? s.observation.exposure : NaN;
      expect(a.location.limits[i]!.center).toBeCloseTo(0.02, 12);
      expect(a.location.limits[i]!.ucl).toBeCloseTo(expectUcl(ai), 12);
      expect(a.location.limits[i]!.lcl).toBe(0);
    });
  });
  it('np chart, n = 100: p̄ = 50/500 = 0.1, CL 10, limits 10 ± 3√9 = 1 and 19', () => {
    const csv = pointsCsv('date,defectives,inspected', [[8, 100], [12, 100], [9, 100], [11, 100], [10, 100]]);
    const l = assessed(assess({ chart: 'np', csv })).location.limits[0]!;
    expect(l.center).toBeCloseTo(10, 12);
    expect(l.ucl).toBeCloseTo(19, 12);
    expect(l.lcl).toBeCloseTo(1, 12);
  });
  it('Xbar-S with equal n = 4: limits X̿ ± A3·s̄, S chart B3·s̄ and B4·s̄ (subgroups chosen so s̄ is exact)', () => {
    // Subgroups {m−1.5, m−0.5, m+0.5, m+1.5}·k: SD = k·√(5/3).
    const groups = [[10, 1], [11, 2], [10.5, 1], [9.5, 2], [10, 1]] as const;
    const rows = groups.flatMap(([m, k], g) => [-1.5, -0.5, 0.5, 1.5].map((d) => `${g + 1},${isoDay(g)},${m + d * k}`));
    const csv = `label,date,value\n${rows.join('\n')}\n`;
    const a = assessed(assess({ chart: 'xbar-s', csv }));
    const sBar = (Math.sqrt(5 / 3) * (1 + 2 + 1 + 2 + 1)) / 5;
    const xbb = (10 + 11 + 10.5 + 9.5 + 10) / 5;
    const k = constants(4);
    expect(a.location.limits[0]!.center).toBeCloseTo(xbb, 12);
    expect(a.location.limits[0]!.ucl).toBeCloseTo(xbb + 1.6281 * sBar, 3);
    expect(a.dispersion!.limits[0]!.center).toBeCloseTo(sBar, 10);
    expect(a.dispersion!.limits[0]!.ucl).toBeCloseTo(2.266 * sBar, 3);
    expect(a.dispersion!.limits[0]!.lcl).toBe(0);
    expect(k.B3).toBe(0);
  });
  it('Xbar-R with unequal sizes: each point gets X̿ ± 3σ̂/√nᵢ, σ̂ = mean(Rᵢ/d2(nᵢ))', () => {
    const rows = [
      ...[1, 2, 3].map((v) => `1,${isoDay(0)},${v}`), // n 3, R 2
      ...[2, 3, 4, 6].map((v) => `2,${isoDay(1)},${v}`), // n 4, R 4
      ...[1, 3].map((v) => `3,${isoDay(2)},${v}`), // n 2, R 2
      ...[2, 3, 4].map((v) => `4,${isoDay(3)},${v}`), // n 3, R 2
      ...[1, 2, 3, 4].map((v) => `5,${isoDay(4)},${v}`), // n 4, R 3
    ];
    const a = assessed(assess({ chart: 'xbar-r', csv: `label,date,value\n${rows.join('\n')}\n` }));
    const d2 = { 2: 1.128379, 3: 1.692569, 4: 2.058751 } as Record<number, number>;
    const sigma = (2 / d2[3]! + 4 / d2[4]! + 2 / d2[2]! + 2 / d2[3]! + 3 / d2[4]!) / 5;
    const grand = (6 + 15 + 4 + 9 + 10) / 16;
    const ns = [3, 4, 2, 3, 4];
    ns.forEach((n, i) => {
      expect(a.location.limits[i]!.center).toBeCloseTo(grand, 12);
      expect(a.location.limits[i]!.ucl).toBeCloseTo(grand + (3 * sigma) / Math.sqrt(n), 5);
    });
  });
});
