/**
 * A reason quotes at most ten point labels: a long series can flag hundreds,
 * and a sentence listing them all is unreadable (summary.json and the
 * signals table still list every one).
 *
 * Hand construction (as in test/signals/explained.test.ts): a ±0.3 zigzag
 * about 10 frozen through point 8 has MR̄ = 0.6 and an upper limit of
 * 10 + 3 · 0.6 / 1.128 ≈ 11.6, so every reading of 13 is beyond it. Fifteen
 * such readings at points 11, 14, …, 53 (every third point) fire the
 * limits rule fifteen times.
 */
import { describe, expect, it } from 'vitest';
import { QUOTED_LABELS } from '../../src/review/recommend.ts';
import { assess, assessed, isoDay, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';

const spikes = Array.from({ length: 15 }, (_, k) => 10 + 3 * k); // indices 10, 13, …, 52
const values = Array.from({ length: 54 }, (_, i) => (spikes.includes(i) ? 13 : 10 + (i % 2 === 0 ? 0.3 : -0.3)));

describe('labels quoted in a reason', () => {
  it('quotes the first ten of fifteen fired points and counts the rest', () => {
    expect(QUOTED_LABELS).toBe(10);
    const a = assessed(assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])), ledger: ledgerCsv([`${isoDay(8)},x,freeze,8,Stable,Q`]) }));
    expect(a.recommendation.action).toBe('investigate');
    const beyond = a.location.signals.filter((s) => s.rule === 'beyond-limits');
    expect(beyond.flatMap((s) => s.flagged)).toEqual(spikes);
    // Labels are the 1-based point numbers: 11, 14, …, 38 for the first ten.
    const firstTen = spikes.slice(0, 10).map((i) => `"${i + 1}"`).join(', ');
    const reason = a.recommendation.reasons.find((r) => r.includes(`Fired at ${firstTen}`));
    expect(reason, a.recommendation.reasons.join('\n')).toBeDefined();
    expect(reason).toContain(`Fired at ${firstTen} and 5 more (`);
    expect(reason).not.toContain('"41"');
  });
});
