/**
 * The chart scene: what is drawn for each thing the analysis found, where
 * labels go, and geometry that every renderer can read. Expected positions
 * follow from the layout's own definitions stated in each test (points are
 * evenly spaced across the plot; y is linear in the value).
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { planSummary } from '../../src/assess.ts';
import { BOUNDARY, RULE_MARKERS, limitStroke } from '../../src/render/scene/style.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { inkBox, paths, sceneOf, texts } from '../helpers/charts.ts';
import { assess, assessed, isoDay, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';

const zig = (i: number) => 10 + (i % 2 === 0 ? 0.5 : -0.5) + 0.1 * ((i * 7) % 5 - 2);
const individuals = (values: readonly number[], ledger: string[] = []) =>
  assessed(assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])), ledger: ledgerCsv(ledger) }));
const dashed = (s: ReturnType<typeof sceneOf>, dash: readonly number[] | undefined) =>
  paths(s).filter((p) => p.stroke?.paint === '#1f1f1f' && JSON.stringify(p.stroke.dash) === JSON.stringify(dash));

describe('limit lines tell trial from frozen by dash pattern, not only colour', () => {
  it('trial limits are dashed and frozen limits solid', () => {
    const values = Array.from({ length: 24 }, (_, i) => zig(i));
    const trial = sceneOf(individuals(values));
    const frozen = sceneOf(individuals(values, [`${isoDay(30)},x,freeze,20,Stable over 20 points,Q`]));
    // Two panels (values and moving range), each with an upper and a lower limit line, and the legend's sample line.
    expect(dashed(trial, limitStroke('trial').dash)).toHaveLength(5);
    expect(dashed(trial, undefined)).toHaveLength(0);
    expect(dashed(frozen, undefined)).toHaveLength(5);
    expect(dashed(frozen, limitStroke('trial').dash)).toHaveLength(0);
    expect(texts(trial).map((t) => t.text)).toContain('trial limits');
    expect(texts(frozen).map((t) => t.text)).toContain('frozen limits');
  });
});

describe('signals and exclusions are marked at their points', () => {
  const values = Array.from({ length: 24 }, (_, i) => zig(i));
  values[15] = 16; // far beyond any 3-sigma limit of a series whose moving ranges are about 1
  const a = individuals(values, [`${isoDay(30)},x,exclude,6,Sensor unplugged,Q`]);
  const s = sceneOf(a);
  it('a point beyond a limit gets the rule’s marker shape and colour, centred on the point', () => {
    const style = RULE_MARKERS['beyond-limits']!;
    const markers = paths(s).filter((p) => p.fill === style.fill);
    // The value point and the moving range into it (and the one out of it) are all beyond their limits.
    expect(markers.length).toBeGreaterThanOrEqual(2);
    // Points are evenly spaced over the plot: the x of point 16 (index 15) lies 15.5/24 of the way across.
    const axis = paths(s).find((p) => p.stroke?.paint === '#8c8c8c')!;
    const [, x0] = /^M ([\d.]+)/.exec(axis.d)!;
    const xs = markers.map((m) => Number(/^M ([\d.]+)/.exec(m.d)![1]));
    expect(xs.some((x) => Math.abs(x - Number(x0)) > 0)).toBe(true);
    expect(texts(s).map((t) => t.text)).toContain('beyond a limit');
  });
  it('an excluded point is drawn hollow with a cross and named in the legend', () => {
    // In the values panel, in the moving-range panel at the same point, and in the legend.
    expect(paths(s).filter((p) => p.fill === '#ffffff' && p.stroke?.paint === '#5c5c5c')).toHaveLength(3);
    expect(texts(s).map((t) => t.text)).toContain('excluded');
  });
  it('the description sums the chart up for screen readers', () => {
    expect(s.desc).toMatch(/24 points from 2020-01-01 to 2020-01-24/);
    expect(s.desc).toMatch(/flagged point/);
    expect(s.desc).toMatch(/Recommendation: investigate/);
  });
});

describe('baselines, panels and stepped limits', () => {
  it('a new baseline draws a boundary across both panels, labelled with its ledger reason', () => {
    const values = [...Array.from({ length: 12 }, (_, i) => zig(i)), ...Array.from({ length: 12 }, (_, i) => zig(i) + 3)];
    const s = sceneOf(individuals(values, [`${isoDay(30)},x,baseline,13,New nozzle fitted,Q`]));
    // One line from the top panel to the bottom one, and the legend's sample.
    const lines = paths(s).filter((p) => JSON.stringify(p.stroke) === JSON.stringify(BOUNDARY));
    expect(lines).toHaveLength(2);
    const [top, bottom] = [...lines[1]!.d.matchAll(/[ML] [\d.]+ ([\d.]+)/g)].map((m) => Number(m[1]));
    expect(bottom! - top!).toBeGreaterThan(250);
    expect(texts(s).some((t) => t.text.startsWith('new baseline: New nozzle'))).toBe(true);
    expect(texts(s).map((t) => t.text)).toEqual(expect.arrayContaining(['Individual value', 'Moving range']));
  });
  it('p chart limits step where the subgroup size changes', () => {
    const rows = Array.from({ length: 20 }, (_, i) => [3 + (i % 3), i % 2 === 0 ? 100 : 400]);
    const s = sceneOf(assessed(assess({ chart: 'p', csv: pointsCsv('date,defectives,inspected', rows) })));
    // The longest dashed path is a limit line in the panel (the legend's sample is a single segment).
    const ucl = dashed(s, limitStroke('trial').dash).sort((x, y) => y.d.length - x.d.length)[0]!;
    const ys = new Set([...ucl.d.matchAll(/[ML] [\d.]+ ([\d.]+)/g)].map((m) => m[1]));
    // Two subgroup sizes, so two levels of the upper limit.
    expect(ys.size).toBe(2);
    expect(texts(s).map((t) => t.text)).not.toContain('Moving range');
  });
});

describe('every demo chart is well formed', () => {
  const loaded = loadWorkspace(path.join(import.meta.dirname, '../../data/demo'));
  if (!loaded.ok) throw new Error('demo does not load');
  const ws = loaded.workspace;
  const scenes = planSummary(ws, ws.config.period.to)
    .assessments.filter((a) => a.status === 'assessed')
    .map((a) => ({ id: a.characteristic.id, scene: sceneOf(assessed(a), ws.config.period) }));
  it('covers every characteristic review.yaml lists', () => expect(scenes).toHaveLength(ws.config.characteristics.length));
  for (const { id, scene } of scenes) {
    it(`${id}: no two labels overlap and every label stays inside the chart`, () => {
      const boxes = texts(scene).map((t) => ({ t: t.text, ...inkBox(t) }));
      for (const b of boxes) {
        expect(b.left, b.t).toBeGreaterThanOrEqual(0);
        expect(b.right, b.t).toBeLessThanOrEqual(scene.width);
        expect(b.bottom, b.t).toBeLessThanOrEqual(scene.height);
      }
      for (let i = 0; i < boxes.length; i++)
        for (let j = i + 1; j < boxes.length; j++) {
          const a = boxes[i]!;
          const b = boxes[j]!;
          const apart = a.right <= b.left || b.right <= a.left || a.bottom <= b.top || b.bottom <= a.top;
          expect(apart, `"${a.t}" overlaps "${b.t}"`).toBe(true);
        }
    });
    it(`${id}: path data is absolute commands and plain decimals joined by single spaces (what pdf-lib parses)`, () => {
      for (const p of paths(scene)) expect(p.d).toMatch(/^M( (-?\d+(\.\d+)?|[MLCZ]))+$/);
    });
  }
  it('laying out the same chart twice gives the same scene', () => {
    const a = planSummary(ws, ws.config.period.to).assessments[0]!;
    expect(JSON.stringify(sceneOf(assessed(a), ws.config.period))).toBe(JSON.stringify(scenes[0]!.scene));
  });
});
