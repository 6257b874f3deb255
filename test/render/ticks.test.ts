/**
 * Axis ticks. Expected values are worked out by hand in the comments; the
 * calendar facts (which dates are Mondays, where months start) are checked
 * against JavaScript's own Date, a general-purpose reference.
 */
import { describe, expect, it } from 'vitest';
import { dateTicks, niceTicks } from '../../src/render/scene/ticks.ts';

const DAY = 86_400_000;
const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const series = (from: string, n: number, stepDays: number) => Array.from({ length: n }, (_, i) => iso(Date.parse(from) + i * stepDays * DAY));
/** A fixed-pitch stand-in for text width: 6 pt a character. */
const pitch = (s: string) => 6 * s.length;

describe('niceTicks picks 1, 2, 2.5 or 5 × 10^k steps', () => {
  it('0 to 1.8 with about 3 ticks steps by 0.5 (0.2 and 0.25 would give 9 and 7 intervals)', () => {
    expect(niceTicks(0, 1.8, 3)).toEqual({ values: [0, 0.5, 1, 1.5], decimals: 1 });
  });
  it('24.5 to 25.5 with about 5 ticks steps by 0.2 and starts at the first multiple inside', () => {
    expect(niceTicks(24.5, 25.5, 5)).toEqual({ values: [24.6, 24.8, 25, 25.2, 25.4], decimals: 1 });
  });
  it('a 2.5 step needs one decimal more than its power of ten', () => {
    expect(niceTicks(0, 1, 3)).toEqual({ values: [0, 0.25, 0.5, 0.75, 1], decimals: 2 });
  });
  it('counts keep whole-number ticks: 0 to 14 steps by 5, not 2.5', () => {
    expect(niceTicks(0, 14, 5)).toEqual({ values: [0, 2.5, 5, 7.5, 10, 12.5], decimals: 1 });
    expect(niceTicks(0, 14, 5, true)).toEqual({ values: [0, 5, 10], decimals: 0 });
    expect(niceTicks(0, 3, 5, true).values).toEqual([0, 1, 2, 3]);
  });
  it('small fractions (a p chart) keep enough decimals to tell ticks apart', () => {
    const t = niceTicks(0, 0.034, 4);
    expect(t.values).toEqual([0, 0.01, 0.02, 0.03]);
    expect(t.decimals).toBe(2);
  });
});

describe('dateTicks reads like a calendar', () => {
  it('weekly points over 2026, 20 pt apart: a tick at the first Monday of each month, the year on the first', () => {
    const dates = series('2026-01-05', 52, 7);
    const ticks = dateTicks(dates, (i) => i * 20, pitch);
    expect(ticks.map((t) => t.label)).toEqual(['Jan 2026', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec']);
    for (const t of ticks) {
      const d = new Date(`${dates[t.index]}T00:00:00Z`);
      expect(d.getUTCDay()).toBe(1);
      expect(d.getUTCDate()).toBeLessThanOrEqual(7);
    }
  });
  it('the year is written again where it changes', () => {
    const ticks = dateTicks(series('2026-11-02', 17, 7), (i) => i * 20, pitch);
    expect(ticks.map((t) => t.label)).toEqual(['Nov 2026', 'Dec', 'Jan 2027', 'Feb']);
  });
  it('daily points with room for them get a label a day', () => {
    const ticks = dateTicks(series('2026-06-01', 5, 1), (i) => i * 60, pitch);
    expect(ticks.map((t) => t.label)).toEqual(['1 Jun 2026', '2 Jun', '3 Jun', '4 Jun', '5 Jun']);
  });
  it('daily points without room fall back to weeks, each on a Monday', () => {
    const dates = series('2026-06-01', 28, 1);
    const ticks = dateTicks(dates, (i) => i * 12, pitch);
    expect(ticks.map((t) => t.label)).toEqual(['1 Jun 2026', '8 Jun', '15 Jun', '22 Jun']);
    for (const t of ticks) expect(new Date(`${dates[t.index]}T00:00:00Z`).getUTCDay()).toBe(1);
  });
  it('a first point in the middle of its month gets no label that reads as the month start', () => {
    const ticks = dateTicks(series('2026-03-18', 12, 7), (i) => i * 20, pitch);
    expect(ticks[0]!.label).toBe('Apr 2026');
  });
  it('never lets two labels overlap, whatever the spacing', () => {
    for (const pitchPt of [0.3, 1, 2.5, 4, 7, 13, 30]) {
      for (const step of [1, 3, 7, 30, 91]) {
        const dates = series('2024-02-14', 300, step);
        const x = (i: number) => i * pitchPt;
        const ticks = dateTicks(dates, x, pitch);
        ticks.slice(1).forEach((t, k) => {
          const prev = ticks[k]!;
          const gap = x(t.index) - pitch(t.label) / 2 - (x(prev.index) + pitch(prev.label) / 2);
          expect(gap, `${pitchPt} pt, every ${step} days: ${prev.label} / ${t.label}`).toBeGreaterThanOrEqual(8);
        });
      }
    }
  });
});
