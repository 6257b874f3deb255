/**
 * Nelson's two diagnostics of how subgroups were formed: fifteen points in a
 * row within 1σ of the center line (limits too wide, stratified subgroups),
 * and eight in a row with none within 1σ, on both sides (a mixture).
 */
import type { Rule, RuleHit } from '../rule.ts';

export const stratification15: Rule = {
  id: 'stratification-15-within-1-sigma',
  description: '15 points in a row within 1 sigma of the center line, on either side.',
  short: '15 within 1σ',
  group: 'zone',
  detect(points) {
    const hits: RuleHit[] = [];
    let length = 0;
    points.forEach((p, i) => {
      length = Math.abs(p.z) <= 1 ? length + 1 : 0;
      if (length >= 15) hits.push({ at: i, start: i - length + 1, side: null });
    });
    return hits;
  },
};

export const mixture8: Rule = {
  id: 'mixture-8-beyond-1-sigma',
  description: '8 points in a row more than 1 sigma from the center line, with points on both sides.',
  short: '8 outside 1σ',
  group: 'zone',
  detect(points) {
    const hits: RuleHit[] = [];
    let length = 0;
    points.forEach((p, i) => {
      length = Math.abs(p.z) > 1 ? length + 1 : 0;
      if (length < 8) return;
      // "Both sides" is judged on the last eight points, the ones that make the pattern.
      const window = points.slice(i - 7, i + 1);
      if (window.some((q) => q.z > 0) && window.some((q) => q.z < 0)) hits.push({ at: i, start: i - 7, side: null });
    });
    return hits;
  },
};
