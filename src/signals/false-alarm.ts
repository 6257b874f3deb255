/**
 * The false-alarm budget: the chance that a perfectly stable characteristic
 * shows at least one signal among the review period's points, for the rules
 * in use. Estimated by a seeded simulation of in-control normal z-scores
 * after a stable history of HISTORY points (so windowed rules see a full
 * window), and cached by rule set and number of points. The tests check it
 * against the exact figure for the limits rule alone, 1 − (1 − 0.0027)^m.
 */
import { seeded, normalFrom } from '../stats/random.ts';
import type { Rule, RulePoint } from './rule.ts';

export const HISTORY = 20;
export const RUNS = 4000;

export interface FalseAlarm {
  /** Probability of at least one signal in the period from noise alone. */
  readonly probability: number;
  /** Its Monte Carlo standard error. */
  readonly standardError: number;
  readonly points: number;
  readonly runs: number;
}

const cache = new Map<string, FalseAlarm>();

/**
 * Past this many points the chance is simulated for HORIZON points and carried
 * to m by 1 − (1 − p)^(m/HORIZON): the rules look back at most 15 points, so
 * stretches of HORIZON points are nearly independent, and simulating a
 * hundred thousand points 4000 times would take minutes for a figure that is
 * then all but 100 %.
 */
export const HORIZON = 500;

export function falseAlarmChance(rules: readonly Rule[], points: number, seed = 7): FalseAlarm {
  if (points > HORIZON) {
    const h = falseAlarmChance(rules, HORIZON, seed);
    const r = points / HORIZON;
    const probability = 1 - (1 - h.probability) ** r;
    // Delta method: d/dp of 1 − (1 − p)^r is r(1 − p)^(r − 1).
    return { probability, standardError: h.standardError * r * (1 - h.probability) ** (r - 1), points, runs: h.runs };
  }
  const key = `${rules.map((r) => r.id).join(',')}|${points}|${seed}`;
  const hit = cache.get(key);
  if (hit) return hit;
  let signalled = 0;
  if (points > 0) {
    const next = seeded(seed);
    const series: RulePoint[] = new Array(HISTORY + points);
    for (let r = 0; r < RUNS; r++) {
      for (let i = 0; i < series.length; i++) {
        const z = normalFrom(next);
        series[i] = { z, beyond: z > 3 ? 'above' : z < -3 ? 'below' : null };
      }
      if (rules.some((rule) => rule.detect(series).some((h) => h.at >= HISTORY))) signalled++;
    }
  }
  const p = signalled / RUNS;
  const result = { probability: p, standardError: Math.sqrt((p * (1 - p)) / RUNS), points, runs: RUNS };
  cache.set(key, result);
  return result;
}
