/**
 * The false-alarm budget by seeded simulation, checked against exact and
 * published figures: for the limits rule alone the chance of at least one
 * point beyond 3σ among m in-control points is exactly 1 − (1 − 0.0026998)^m
 * (the two-sided normal tail beyond 3σ); for the Western Electric set, the
 * published in-control ARL.
 */
import { describe, expect, it } from 'vitest';
import { HISTORY, RUNS, falseAlarmChance } from '../../src/signals/false-alarm.ts';
import { RULE_SETS, rule } from '../../src/signals/rule-sets.ts';
import type { Rule } from '../../src/signals/rule.ts';
import { normalCdf } from '../../src/stats/normal.ts';

const rules = (ids: readonly string[]) => ids.map((id) => rule(id)!).filter((r): r is Rule => r !== undefined);
const tail = 2 * (1 - normalCdf(3));

describe('chance of at least one signal from noise alone', () => {
  it('the limits rule alone agrees with the exact 1 − (1 − 0.0027)^m within three Monte Carlo standard errors', () => {
    expect(tail).toBeCloseTo(0.0026998, 6);
    for (const m of [5, 20, 60]) {
      const sim = falseAlarmChance(rules(['beyond-limits']), m);
      const exact = 1 - (1 - tail) ** m;
      expect(Math.abs(sim.probability - exact), `m = ${m}`).toBeLessThan(3 * Math.sqrt((exact * (1 - exact)) / RUNS) + 1e-9);
    }
  });
  it('the four Western Electric rules signal far more often than the limits rule alone, about as the published ARL of 91.75 implies', () => {
    // Champ & Woodall (1987): in-control ARL 91.75 for the four rules together. A run length
    // that were geometric with that mean would give 1 − (1 − 1/91.75)^m; the true distribution is
    // not quite geometric, so allow ±0.05.
    const m = 50;
    const sim = falseAlarmChance(rules(RULE_SETS['western-electric']), m);
    expect(Math.abs(sim.probability - (1 - (1 - 1 / 91.75) ** m))).toBeLessThan(0.05);
    expect(sim.probability).toBeGreaterThan(falseAlarmChance(rules(['beyond-limits']), m).probability * 3);
  });
  it('is zero with no points in the period, and the same on every call (seeded)', () => {
    expect(falseAlarmChance(rules(['beyond-limits']), 0).probability).toBe(0);
    const a = falseAlarmChance(rules(RULE_SETS.nelson), 12, 3);
    const b = falseAlarmChance(rules(RULE_SETS.nelson), 12, 3);
    expect(a).toEqual(b);
    expect(HISTORY).toBeGreaterThanOrEqual(15);
  });
});
