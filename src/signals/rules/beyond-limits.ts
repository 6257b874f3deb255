import type { Rule, RuleHit } from '../rule.ts';

export const beyondLimits: Rule = {
  id: 'beyond-limits',
  description: 'One point beyond a control limit (more than 3 sigma from the center line).',
  short: 'beyond a limit',
  group: 'limits',
  detect(points) {
    const hits: RuleHit[] = [];
    points.forEach((p, i) => {
      if (p.beyond) hits.push({ at: i, start: i, side: p.beyond });
    });
    return hits;
  },
};
