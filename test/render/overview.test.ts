/**
 * Long series are drawn as a min/max overview: per half-point column the
 * first, lowest, highest and last vertex (the M4 reduction). Checked by hand
 * on a small run, and on a 200,000-point chart that the PDF renderer can draw
 * (pdf-lib overflowed its stack on a 100,000-point path before).
 */
import { describe, expect, it } from 'vitest';
import { scenePdf } from '../../src/pack/pdf.ts';
import { layoutChart, overview } from '../../src/render/scene/layout.ts';
import { chartSpec } from '../../src/render/scene/spec.ts';
import { createTextMetrics } from '../../src/render/scene/text-metrics.ts';
import { fonts } from '../helpers/charts.ts';
import { assess, assessed } from '../helpers/in-memory.ts';

describe('min/max overview of a long polyline', () => {
  it('keeps first, lowest, highest and last of each half-point column, in order (by hand)', () => {
    // Twenty vertices in two columns, x 0.0–0.45 and 0.5–0.95, with y repeating 3, 9, 1, 5.
    // Column 1 (i 0–9): first i0 (3), highest first at i1 (9), lowest first at i2 (1), last i9 (9).
    // Column 2 (i 10–19): first i10 is also the lowest (1), highest first at i13 (9), last i19 (5).
    const run = Array.from({ length: 20 }, (_, i) => [i * 0.05, [3, 9, 1, 5][i % 4]!] as const);
    expect(overview(run).map(([x, y]) => [Number(x.toFixed(2)), y])).toEqual([
      [0, 3], [0.05, 9], [0.1, 1], [0.45, 9],
      [0.5, 1], [0.65, 9], [0.95, 5],
    ]);
  });
  it('leaves a short run alone', () => {
    const run = [[0, 1], [10, 2], [20, 3]] as const;
    expect(overview(run)).toBe(run);
  });
  it('a 200,000-point chart has a path of a few thousand vertices, says it is an overview, and the PDF draws it', async () => {
    const n = 200_000;
    const rows = Array.from({ length: n }, (_, i) => `${i},2026-01-01,${(10 + Math.sin(i / 7) * 0.3 + ((i * 7919) % 13) / 40).toFixed(3)}`);
    const a = assessed(assess({ chart: 'individuals', csv: `label,date,value\n${rows.join('\n')}\n`, rules: ['beyond-limits'] }));
    const scene = layoutChart(chartSpec(a, { from: '2026-01-01', to: '2026-01-01' }), createTextMetrics(fonts));
    const longest = Math.max(...scene.items.filter((p) => p.kind === 'path').map((p) => (p.kind === 'path' ? p.d.split(' L ').length : 0)));
    expect(longest).toBeLessThan(6000);
    expect(scene.items.some((p) => p.kind === 'text' && p.text === 'min/max overview of 200,000 points')).toBe(true);
    expect((await scenePdf(scene, fonts)).length).toBeGreaterThan(1000);
  });
});
