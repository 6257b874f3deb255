/**
 * "k of m successive points beyond kσ on one side". Fires at point i when
 * point i itself qualifies and at least k of the last m points (fewer at the
 * start of a baseline) are beyond the threshold on the same side; points
 * beyond 3σ count too. The other points of the window may be anywhere.
 */
import type { Rule, RuleHit, Side } from '../rule.ts';

function kOfM(id: string, k: number, m: number, threshold: number, description: string): Rule {
  return {
    id,
    description,
    short: `${k} of ${m} beyond ${threshold}σ`,
    group: 'zone',
    detect(points) {
      const hits: RuleHit[] = [];
      const beyondOn = (z: number, side: Side) => (side === 'above' ? z > threshold : z < -threshold);
      points.forEach((p, i) => {
        for (const side of ['above', 'below'] as const) {
          if (!beyondOn(p.z, side)) continue;
          let count = 0;
          let first = i;
          for (let j = Math.max(0, i - m + 1); j <= i; j++) {
            if (beyondOn(points[j]!.z, side)) {
              if (count === 0) first = j;
              count++;
            }
          }
          if (count >= k) hits.push({ at: i, start: first, side });
        }
      });
      return hits;
    },
  };
}

export const twoOfThreeBeyond2Sigma = kOfM(
  'two-of-three-beyond-2-sigma',
  2,
  3,
  2,
  'Two of three successive points more than 2 sigma from the center line, on the same side.',
);

export const fourOfFiveBeyond1Sigma = kOfM(
  'four-of-five-beyond-1-sigma',
  4,
  5,
  1,
  'Four of five successive points more than 1 sigma from the center line, on the same side.',
);
