/**
 * The engine fixture (test/fixtures/engine, invented data shaped by
 * make-fixture.mjs): one characteristic per recommendation path. Expected
 * actions follow from how each series was built (see the generator's
 * comments); expected limits are recomputed here from the CSV by the
 * textbook formulas, independently of src/stats.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { planSummary } from '../src/assess.ts';
import type { Summary } from '../src/summary.ts';
import { loadWorkspace } from '../src/workspace/load.ts';

const DIR = path.join(import.meta.dirname, 'fixtures/engine');
const loaded = loadWorkspace(DIR);
if (!loaded.ok) throw new Error('fixture does not load');
const plan = planSummary(loaded.workspace, '2026-11-30');
// Through JSON, as a reader of summary.json sees it.
const summary = JSON.parse(JSON.stringify(plan.summary)) as Summary;
const byId = (id: string) => {
  const c = summary.characteristics.find((x) => x.id === id);
  if (!c || c.status !== 'assessed') throw new Error(`${id} not assessed`);
  return c;
};
const csvRows = (file: string) =>
  readFileSync(path.join(DIR, 'data', file), 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));

describe('engine fixture: one recommendation per path', () => {
  it('builds with exit code 0 and no errors', () => {
    expect(plan.exitCode).toBe(0);
    expect(plan.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  });
  it('collecting: fewer than 5 points → keep, collecting 3 of 5, no limits', () => {
    const c = byId('collecting');
    expect(c.recommendation.action).toBe('keep');
    expect(c.recommendation.reasons[0]).toMatch(/3 of 5/);
    expect(c.points.every((p) => p.ucl === null && p.center === null)).toBe(true);
  });
  it('trial with 22 stable points → freeze through the latest point, with the ledger line', () => {
    const c = byId('fill-trial');
    expect(c.recommendation.action).toBe('freeze');
    expect(c.recommendation.ledger).toEqual(['2026-11-30,fill-trial,freeze,2026-11-30,Trial limits stable over 22 usable points,']);
    expect(c.baselines).toHaveLength(1);
    expect(c.baselines[0]!.status).toBe('trial');
  });
  it('trial limits equal x̄ ± 2.66·MR̄ recomputed from the CSV (2.6587 = 3/d2(2))', () => {
    const xs = csvRows('fill-trial.csv').map((r) => Number(r[1]));
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    const mrBar = xs.slice(1).reduce((a, x, i) => a + Math.abs(x - xs[i]!), 0) / (xs.length - 1);
    const p = byId('fill-trial').points[0]!;
    expect(p.center).toBeCloseTo(mean, 10);
    expect(p.ucl!).toBeCloseTo(mean + 2.6587 * mrBar, 3);
    expect(byId('fill-trial').dispersion!.points[1]!.ucl!).toBeCloseTo(3.2665 * mrBar, 3);
  });
  it('frozen and stable → keep; limits rest on the 20 points through the freeze and extend over all 30', () => {
    const c = byId('torque');
    expect(c.recommendation.action).toBe('keep');
    expect(c.baselines[0]!.status).toBe('frozen');
    expect(c.baselines[0]!.basis).toHaveLength(20);
    const ucls = new Set(c.points.map((p) => p.ucl));
    expect(ucls.size).toBe(1);
    // X̿ ± A2·R̄ over the first 20 subgroups, recomputed from the CSV rows.
    const rows = csvRows('torque.csv');
    const groups = new Map<string, number[]>();
    for (const [d, v] of rows) groups.set(d!, [...(groups.get(d!) ?? []), Number(v)]);
    const first = [...groups.values()].slice(0, 20);
    const xbb = first.reduce((a, g) => a + g.reduce((s, x) => s + x, 0) / 5, 0) / 20;
    const rBar = first.reduce((a, g) => a + Math.max(...g) - Math.min(...g), 0) / 20;
    expect(c.points[25]!.center).toBeCloseTo(xbb, 10);
    expect(c.points[25]!.ucl!).toBeCloseTo(xbb + 0.5768 * rBar, 3);
    expect(c.dispersion!.points[25]!.ucl!).toBeCloseTo(2.1145 * rBar, 3);
  });
  it('a fleeting point beyond the limits in the period → investigate', () => {
    const c = byId('wall');
    expect(c.recommendation.action).toBe('investigate');
    expect(c.signals.map((s) => [s.rule, s.persistence, s.flagged])).toEqual([['beyond-limits', 'fleeting', ['2026-11-16']]]);
    expect(c.points.find((p) => p.label === '2026-11-16')!.signals).toEqual(['beyond-limits']);
  });
  it('an exclusion with its cause: the point stays on the chart, marked, out of the limits, its signal explained', () => {
    const c = byId('labels');
    expect(c.recommendation.action).toBe('keep');
    const excluded = c.points.filter((p) => p.excluded).map((p) => p.label);
    expect(excluded).toEqual(['2026-08-03']);
    expect(c.baselines[0]!.basis).not.toContain('2026-08-03');
    expect(c.baselines[0]!.basis).toHaveLength(19);
    // p̄ = Σd/Σn over the 19 usable points through the freeze.
    const rows = csvRows('labels.csv').slice(0, 20).filter((r) => r[0] !== '2026-08-03');
    const pBar = rows.reduce((a, r) => a + Number(r[1]), 0) / rows.reduce((a, r) => a + Number(r[2]), 0);
    const p0 = c.points[0]!;
    expect(p0.center).toBeCloseTo(pBar, 12);
    expect(p0.ucl!).toBeCloseTo(pBar + 3 * Math.sqrt((pBar * (1 - pBar)) / p0.inspected!), 12);
    expect(c.signals.every((s) => s.explained)).toBe(true);
  });
  it('a baseline entry after a recorded change starts new trial limits at that point', () => {
    const c = byId('caps');
    expect(c.baselines.map((b) => [b.start, b.status, b.reason])).toEqual([
      ['2026-06-01', 'trial', null],
      ['2026-09-14', 'trial', 'New baseline after the capping head change'],
    ]);
    expect(c.recommendation.action).toBe('keep');
    const later = c.points.filter((p) => p.baseline === 1);
    expect(later[0]!.center).toBeCloseTo(later.reduce((a, p) => a + p.defectives!, 0) / later.length, 12);
  });
  it('a persistent shift in the better direction → re-baseline at the first point of the run', () => {
    const c = byId('stoppages');
    expect(c.recommendation.action).toBe('re-baseline');
    expect(c.recommendation.changePoint).toBe('2026-09-28');
    expect(c.recommendation.ledger[0]).toMatch(/^2026-11-30,stoppages,baseline,2026-09-28,/);
    expect(c.signals.some((s) => s.rule === 'run-8-one-side' && s.persistence === 'persistent' && s.side === 'below')).toBe(true);
  });
  it('a persistent shift in the worse direction with no recorded change → investigate, limits not moved', () => {
    const c = byId('first-aid');
    expect(c.recommendation.action).toBe('investigate');
    expect(c.recommendation.ledger).toEqual([]);
    expect(c.recommendation.reasons.join(' ')).toMatch(/bring the process back/);
  });
  it('a shift that a recorded change explains → re-baseline at the recorded point', () => {
    const c = byId('cycle');
    expect(c.recommendation.action).toBe('re-baseline');
    expect(c.recommendation.changePoint).toBe('2026-10-05');
    expect(c.recommendation.reasons.join(' ')).toMatch(/Controller retuned/);
  });
  it('standard values given: limits are center ± 3σ from review.yaml, not from the data', () => {
    const c = byId('standard');
    expect(c.points[0]!.center).toBe(10);
    expect(c.points[0]!.ucl).toBeCloseTo(11.5, 12);
    expect(c.points[0]!.lcl).toBeCloseTo(8.5, 12);
    expect(c.baselines[0]!.source).toBe('standard');
    expect(c.recommendation.action).toBe('keep');
  });
  it('every point carries the limits it is judged against, and the summary lists all contract fields', () => {
    for (const c of summary.characteristics) {
      expect(Object.keys(c)).toEqual(expect.arrayContaining(['id', 'chart', 'points', 'baselines', 'signals', 'recommendation', 'capability']));
      for (const p of c.points) {
        expect(Object.keys(p)).toEqual(expect.arrayContaining(['label', 'date', 'value', 'center', 'ucl', 'lcl', 'excluded', 'signals']));
      }
    }
  });
});
