/** Six points in a row steadily increasing or steadily decreasing (five successive rises or falls); a tie breaks it. */
import type { Rule, RuleHit } from '../rule.ts';

const POINTS = 6;

export const trend6: Rule = {
  id: 'trend-6',
  description: `${POINTS} points in a row steadily increasing or steadily decreasing.`,
  short: `${POINTS} trending`,
  group: 'run',
  detect(points) {
    const hits: RuleHit[] = [];
    let direction = 0;
    let steps = 0;
    for (let i = 1; i < points.length; i++) {
      const d = Math.sign(points[i]!.z - points[i - 1]!.z);
      steps = d !== 0 && d === direction ? steps + 1 : d === 0 ? 0 : 1;
      direction = d;
      if (direction !== 0 && steps >= POINTS - 1) {
        hits.push({ at: i, start: i - steps, side: direction > 0 ? 'above' : 'below' });
      }
    }
    return hits;
  },
};
