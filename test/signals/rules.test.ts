/**
 * Each rule on hand-made z-score sequences, at the boundary where it starts
 * to fire. Conventions under test (REFERENCE §3, adopted in README): strict
 * "beyond", a point on the center line ends a run, ties break trends and
 * alternation, a run keeps firing while it lasts.
 */
import { describe, expect, it } from 'vitest';
import { rulePoint } from '../../src/signals/evaluate.ts';
import type { Rule } from '../../src/signals/rule.ts';
import { RULE_SETS, rule, rulesFor } from '../../src/signals/rule-sets.ts';

const limits = { center: 0, sigma: 1, ucl: 3, lcl: -3 };
const seq = (zs: number[]) => zs.map((z) => rulePoint(z, limits));
const get = (id: string): Rule => rule(id)!;
const firedAt = (id: string, zs: number[]) => get(id).detect(seq(zs)).map((h) => h.at);

describe('beyond-limits', () => {
  it('a point exactly on a limit is not beyond it; just past it is', () => {
    expect(firedAt('beyond-limits', [3, -3, 0])).toEqual([]);
    expect(firedAt('beyond-limits', [0, 3.0001, -3.0001])).toEqual([1, 2]);
  });
});

describe('two-of-three-beyond-2-sigma', () => {
  it('fires on the second of two points beyond 2σ on one side within three', () => {
    expect(firedAt('two-of-three-beyond-2-sigma', [2.1, 0, 2.1])).toEqual([2]);
    expect(get('two-of-three-beyond-2-sigma').detect(seq([2.1, 0, 2.1]))[0]!.start).toBe(0);
  });
  it('exactly 2σ does not count; opposite sides do not combine; four apart is outside the window', () => {
    expect(firedAt('two-of-three-beyond-2-sigma', [2, 0, 2.5])).toEqual([]);
    expect(firedAt('two-of-three-beyond-2-sigma', [2.5, -2.5, 0])).toEqual([]);
    expect(firedAt('two-of-three-beyond-2-sigma', [2.5, 0, 0, 2.5])).toEqual([]);
  });
  it('a point beyond 3σ counts as beyond 2σ', () => {
    expect(firedAt('two-of-three-beyond-2-sigma', [3.5, 2.2])).toEqual([1]);
  });
});

describe('four-of-five-beyond-1-sigma', () => {
  it('fires on the fourth of four points beyond 1σ within five', () => {
    expect(firedAt('four-of-five-beyond-1-sigma', [1.1, 1.1, 0, 1.1, 1.1])).toEqual([4]);
  });
  it('three of five, or exactly 1σ, do not', () => {
    expect(firedAt('four-of-five-beyond-1-sigma', [1.1, 1.1, 0, 0, 1.1, 1.1])).toEqual([]);
    expect(firedAt('four-of-five-beyond-1-sigma', [1.1, 1.1, 1, 1.1])).toEqual([]);
  });
});

describe('run-8-one-side and run-9-one-side', () => {
  const above = (n: number) => Array<number>(n).fill(0.5);
  it('eight on one side fire at the eighth and keep firing; seven do not', () => {
    expect(firedAt('run-8-one-side', above(7))).toEqual([]);
    expect(firedAt('run-8-one-side', above(10))).toEqual([7, 8, 9]);
    expect(get('run-8-one-side').detect(seq(above(8)))[0]).toEqual({ at: 7, start: 0, side: 'above' });
  });
  it('a point exactly on the center line ends the run', () => {
    expect(firedAt('run-8-one-side', [...above(4), 0, ...above(4)])).toEqual([]);
  });
  it('Nelson’s run needs nine', () => {
    expect(firedAt('run-9-one-side', above(8))).toEqual([]);
    expect(firedAt('run-9-one-side', above(9))).toEqual([8]);
  });
});

describe('trend-6', () => {
  it('six steadily increasing points fire at the sixth; five do not; a tie breaks the trend', () => {
    expect(firedAt('trend-6', [0, 0.1, 0.2, 0.3, 0.4])).toEqual([]);
    expect(firedAt('trend-6', [0, 0.1, 0.2, 0.3, 0.4, 0.5])).toEqual([5]);
    expect(firedAt('trend-6', [0, 0.1, 0.2, 0.2, 0.3, 0.4, 0.5])).toEqual([]);
    expect(firedAt('trend-6', [0.5, 0.4, 0.3, 0.2, 0.1, 0])).toEqual([5]);
  });
});

describe('alternating-14', () => {
  const alt = (n: number) => Array.from({ length: n }, (_, i) => (i % 2 ? -0.5 : 0.5));
  it('fourteen alternating points fire at the fourteenth; thirteen do not; a tie breaks it', () => {
    expect(firedAt('alternating-14', alt(13))).toEqual([]);
    expect(firedAt('alternating-14', alt(14))).toEqual([13]);
    const broken = alt(14);
    broken[7] = broken[6]!;
    expect(firedAt('alternating-14', broken)).toEqual([]);
  });
});

describe('stratification-15-within-1-sigma and mixture-8-beyond-1-sigma', () => {
  it('fifteen points within 1σ (1σ itself counts as within) fire; fourteen do not', () => {
    const within = Array.from({ length: 15 }, (_, i) => (i % 2 ? -1 : 0.2));
    expect(firedAt('stratification-15-within-1-sigma', within.slice(0, 14))).toEqual([]);
    expect(firedAt('stratification-15-within-1-sigma', within)).toEqual([14]);
  });
  it('eight points beyond 1σ on both sides fire; all on one side do not', () => {
    const both = Array.from({ length: 8 }, (_, i) => (i % 2 ? -1.5 : 1.5));
    expect(firedAt('mixture-8-beyond-1-sigma', both)).toEqual([7]);
    expect(firedAt('mixture-8-beyond-1-sigma', both.slice(0, 7))).toEqual([]);
    expect(firedAt('mixture-8-beyond-1-sigma', Array<number>(8).fill(1.5))).toEqual([]);
  });
});

describe('rule sets', () => {
  it('Western Electric is the four zone rules; Nelson is eight tests', () => {
    expect(RULE_SETS['western-electric']).toHaveLength(4);
    expect(RULE_SETS.nelson).toHaveLength(8);
  });
  it('attribute charts drop the zone rules of a named set; dispersion charts keep the limits rule only', () => {
    expect(rulesFor('western-electric', 'attributes').map((r) => r.id)).toEqual(['beyond-limits', 'run-8-one-side']);
    expect(rulesFor('nelson', 'attributes').map((r) => r.id)).toEqual(['beyond-limits', 'run-9-one-side', 'trend-6', 'alternating-14']);
    expect(rulesFor('nelson', 'dispersion').map((r) => r.id)).toEqual(['beyond-limits']);
  });
  it('an explicit list applies as written, zone rules included', () => {
    expect(rulesFor(['two-of-three-beyond-2-sigma'], 'attributes').map((r) => r.id)).toEqual(['two-of-three-beyond-2-sigma']);
  });
  it('rule ids are descriptive, never numbered labels', () => {
    for (const r of RULE_SETS.nelson) expect(r).not.toMatch(/^(test|rule)[- ]?\d/i);
  });
});
