/**
 * N successive points on the same side of the center line; a point on the
 * line ends the run. Where points carry their side of a skewed count's
 * median (see ../median-line.ts), the run is counted in probability: it fires
 * once the product of its points' one-side probabilities is no larger than
 * (1/2)^N, which is N points when every side has probability 1/2.
 */
import type { Rule, RuleHit, Side } from '../rule.ts';
import { runSideOf } from '../rule.ts';

/** Slack for the sum of N logarithms of 1/2 compared with N·ln(1/2). */
const EPS = 1e-9;

function runOneSide(n: number): Rule {
  const threshold = n * Math.log(0.5) + EPS;
  return {
    id: `run-${n}-one-side`,
    description: `${n} successive points on the same side of the center line.`,
    short: `${n} on one side`,
    group: 'run',
    detect(points) {
      const hits: RuleHit[] = [];
      let side: Side | null = null;
      let length = 0;
      let logP = 0;
      points.forEach((p, i) => {
        const s = runSideOf(p);
        const lp = Math.log(p.run ? p.run.p : 0.5);
        if (s !== null && s === side) {
          length += 1;
          logP += lp;
        } else {
          length = s === null ? 0 : 1;
          logP = s === null ? 0 : lp;
        }
        side = s;
        if (side !== null && logP <= threshold) hits.push({ at: i, start: i - length + 1, side });
      });
      return hits;
    },
  };
}

export const run8OneSide = runOneSide(8);
export const run9OneSide = runOneSide(9);
