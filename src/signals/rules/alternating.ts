/** Fourteen points in a row alternating up and down (thirteen differences of alternating sign); a tie breaks it. */
import type { Rule, RuleHit } from '../rule.ts';

const POINTS = 14;

export const alternating14: Rule = {
  id: 'alternating-14',
  description: `${POINTS} points in a row alternating up and down.`,
  short: `${POINTS} alternating`,
  group: 'run',
  detect(points) {
    const hits: RuleHit[] = [];
    let previous = 0;
    let steps = 0;
    for (let i = 1; i < points.length; i++) {
      const d = Math.sign(points[i]!.z - points[i - 1]!.z);
      steps = d === 0 ? 0 : previous !== 0 && d === -previous ? steps + 1 : 1;
      previous = d;
      if (steps >= POINTS - 1) hits.push({ at: i, start: i - steps, side: null });
    }
    return hits;
  },
};
