/** Scenes for tests: a chart laid out with the real font metrics. */
import type { Assessed } from '../../src/analyse.ts';
import { loadFonts } from '../../src/render/fonts.ts';
import { layoutChart } from '../../src/render/scene/layout.ts';
import { chartSpec } from '../../src/render/scene/spec.ts';
import { createTextMetrics } from '../../src/render/scene/text-metrics.ts';
import type { Primitive, Scene } from '../../src/render/scene/types.ts';

export const fonts = loadFonts();
export const metrics = createTextMetrics(fonts);

export function sceneOf(a: Assessed, period = { from: '1900-01-01', to: '2999-12-31' }): Scene {
  return layoutChart(chartSpec(a, period), metrics);
}

export type TextItem = Extract<Primitive, { kind: 'text' }>;
export type PathItem = Extract<Primitive, { kind: 'path' }>;
export const texts = (s: Scene) => s.items.filter((p): p is TextItem => p.kind === 'text');
export const paths = (s: Scene) => s.items.filter((p): p is PathItem => p.kind === 'path');

/** The ink box of a label: cap height above the baseline, descenders below (IBM Plex Sans: cap height 0.698 em). */
export function inkBox(t: TextItem) {
  const left = t.anchor === 'start' ? t.x : t.anchor === 'middle' ? t.x - t.width / 2 : t.x - t.width;
  return { left, right: left + t.width, top: t.y - 0.72 * t.size, bottom: t.y + 0.22 * t.size };
}
