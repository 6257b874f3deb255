/** N successive points on the same side of the center line; a point on the line ends the run. */
import type { Rule, RuleHit, Side } from '../rule.ts';
import { sideOf } from '../rule.ts';

function runOneSide(n: number): Rule {
  return {
    id: `run-${n}-one-side`,
    description: `${n} successive points on the same side of the center line.`,
    short: `${n} on one side`,
    group: 'run',
    detect(points) {
      const hits: RuleHit[] = [];
      let side: Side | null = null;
      let length = 0;
      points.forEach((p, i) => {
        const s = sideOf(p.z);
        length = s !== null && s === side ? length + 1 : s === null ? 0 : 1;
        side = s;
        if (side !== null && length >= n) hits.push({ at: i, start: i - length + 1, side });
      });
      return hits;
    },
  };
}

export const run8OneSide = runOneSide(8);
export const run9OneSide = runOneSide(9);
