/**
 * From a chart in data units to a scene in points: scales, ticks, every
 * line, band, marker and label placed and measured. Renderers only draw
 * what this returns. Pure, given the text metrics.
 */
import { fmt, geom, printable } from '../../format.ts';
import { rule } from '../../signals/rule-sets.ts';
import type { Limits } from '../../stats/family.ts';
import type { ChartSpec, LimitKind, PanelSpec } from './spec.ts';
import {
  BOUNDARY,
  CHANGE,
  CENTER,
  ESTIMATE,
  LEVEL,
  RANGE,
  GRID,
  INK,
  MUTED,
  PERIOD,
  SERIES,
  WHITE,
  ZONE,
  centerStroke,
  circlePath,
  limitStroke,
  markerStyle,
  shapePath,
} from './style.ts';
import { type TextMetrics, type Weight, truncate } from './text-metrics.ts';
import { dateTicks, niceTicks } from './ticks.ts';
import type { Paint, Primitive, Scene, Stroke } from './types.ts';

export interface LayoutOptions {
  /** Scene width in points; 640 by default, which scales to an A4 or Letter text width with labels still legible. */
  readonly width?: number;
}

const PAD = 10;
const TITLE = 14;
const SUBTITLE = 10;
const SMALL = 9;
const LEGEND_ROW = 14;
const AXIS: Stroke = { paint: '#8c8c8c', width: 0.7 };

type Pt = readonly [number, number];

/** Width of one drawing column in points: finer than any printer or screen shows. */
const COLUMN = 0.5;

/**
 * A long polyline thinned to what can be seen: in each column of COLUMN
 * points, the first, lowest, highest and last vertex, in their order (the
 * M4 reduction). The drawn line is the same at that resolution, and a path
 * of a million points — which no viewer needs and pdf-lib cannot take —
 * becomes a few thousand.
 */
export function overview(run: readonly Pt[]): readonly Pt[] {
  if (run.length < 8 || run.length <= 4 * Math.max(1, (run[run.length - 1]![0] - run[0]![0]) / COLUMN)) return run;
  const out: Pt[] = [];
  let i = 0;
  while (i < run.length) {
    const col = Math.floor(run[i]![0] / COLUMN);
    let j = i;
    let lo = i;
    let hi = i;
    while (j < run.length && Math.floor(run[j]![0] / COLUMN) === col) {
      if (run[j]![1] < run[lo]![1]) lo = j;
      if (run[j]![1] > run[hi]![1]) hi = j;
      j++;
    }
    for (const k of [...new Set([i, lo, hi, j - 1])].sort((a, b) => a - b)) out.push(run[k]!);
    i = j;
  }
  return out;
}

function pathOf(runs: readonly (readonly Pt[])[]): string {
  return runs
    .map(overview)
    .filter((r) => r.length > 1)
    .map((r) => r.map(([x, y], i) => `${i === 0 ? 'M' : 'L'} ${geom(x)} ${geom(y)}`).join(' '))
    .join(' ');
}

function line(x1: number, y1: number, x2: number, y2: number, stroke: Stroke): Primitive {
  return { kind: 'path', d: `M ${geom(x1)} ${geom(y1)} L ${geom(x2)} ${geom(y2)}`, stroke };
}

interface PanelFrame {
  readonly spec: PanelSpec;
  readonly top: number;
  readonly bottom: number;
  readonly lo: number;
  readonly hi: number;
  readonly ticks: ReturnType<typeof niceTicks>;
}

function domainOf(p: PanelSpec): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of p.values) if (v !== null) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
  for (const l of p.limits) if (l) (lo = Math.min(lo, l.lcl, l.center)), (hi = Math.max(hi, l.ucl, l.center));
  for (const r of p.limitRanges) if (r) (lo = Math.min(lo, r.lcl[0])), (hi = Math.max(hi, r.ucl[1]));
  if (!Number.isFinite(lo)) return [0, 1];
  if (hi === lo) {
    const d = Math.abs(hi) * 0.1 || 1;
    return [lo - d, hi + d];
  }
  const pad = (hi - lo) * 0.07;
  return [lo >= 0 && lo - pad < 0 ? 0 : lo - pad, hi + pad];
}

export function layoutChart(spec: ChartSpec, metrics: TextMetrics, options: LayoutOptions = {}): Scene {
  const width = options.width ?? 640;
  const items: Primitive[] = [];
  const n = spec.dates.length;
  const text = (x: number, y: number, raw: string, size: number, anchor: 'start' | 'middle' | 'end' = 'start', fill: Paint = INK, weight: Weight = 400, s = printable(raw)) =>
    // Whole-point baselines: satori snaps baselines to the pixel grid, and the PDF and inline SVG then agree with it.
    items.push({ kind: 'text', x, y: Math.round(y), text: s, size, weight, anchor, width: metrics.width(s, size, weight), fill });

  // Header.
  text(PAD, PAD + TITLE * 0.8, truncate(metrics, spec.title, TITLE, width - 2 * PAD, 600), TITLE, 'start', INK, 600);
  text(PAD, PAD + TITLE + 13, truncate(metrics, spec.subtitle, SUBTITLE, width - 2 * PAD), SUBTITLE, 'start', MUTED);

  // Legend: only what this chart shows.
  const kinds = new Set<LimitKind>(spec.baselines.filter((_, k) => spec.panels[0]!.limits.some((l, i) => l && i >= spec.baselines[k]!.start && i < spec.baselines[k]!.end)).map((b) => b.kind));
  const rulesShown = [...new Set(spec.panels.flatMap((p) => p.markers.map((m) => m.rule)))];
  const legend: { label: string; swatch: (x: number, y: number) => Primitive[] }[] = [
    {
      label: 'values',
      swatch: (x, y) => [line(x, y, x + 18, y, { paint: SERIES, width: 1.1 }), { kind: 'path', d: circlePath(x + 9, y, 2.2), fill: SERIES }],
    },
    ...(kinds.size > 0 ? [{ label: 'center line', swatch: (x: number, y: number) => [line(x, y, x + 18, y, centerStroke('frozen'))] }] : []),
    ...(['frozen', 'trial', 'standard'] as const)
      .filter((k) => kinds.has(k))
      .map((k) => ({ label: k === 'standard' ? 'limits from standard values' : `${k} limits`, swatch: (x: number, y: number) => [line(x, y, x + 18, y, limitStroke(k))] })),
    ...(spec.panels[0]!.zones && kinds.size > 0
      ? [
          {
            label: '1σ and 2σ zones',
            swatch: (x: number, y: number): Primitive[] => [
              { kind: 'rect', x, y: y - 4, w: 18, h: 8, fill: ZONE, opacity: 0.1 },
              { kind: 'rect', x, y: y - 2, w: 18, h: 4, fill: ZONE, opacity: 0.16 },
            ],
          },
        ]
      : []),
    ...(spec.panels[0]!.limitRanges.some(Boolean)
      ? [{ label: '90% range of trial limits', swatch: (x: number, y: number): Primitive[] => [{ kind: 'rect', x, y: y - 4, w: 18, h: 8, fill: RANGE, opacity: 0.08 }] }]
      : []),
    ...(spec.shift
      ? [
          { label: 'level before and after', swatch: (x: number, y: number) => [line(x, y, x + 18, y, LEVEL)] },
          {
            label: 'estimated change',
            swatch: (x: number, y: number): Primitive[] => [
              { kind: 'rect', x, y: y - 2, w: 18, h: 4, fill: ESTIMATE, opacity: 0.45 },
              { kind: 'path', d: shapePath('triangle-up', x + 9, y - 1, 3), fill: ESTIMATE },
            ],
          },
        ]
      : []),
    ...(spec.period ? [{ label: 'review period', swatch: (x: number, y: number): Primitive[] => [{ kind: 'rect', x, y: y - 4, w: 18, h: 8, fill: PERIOD, opacity: 0.35 }] }] : []),
    ...(spec.baselines.length > 1 ? [{ label: 'new baseline', swatch: (x: number, y: number) => [line(x + 9, y - 5, x + 9, y + 5, BOUNDARY)] }] : []),
    ...(spec.changes.length ? [{ label: 'recorded change', swatch: (x: number, y: number) => [line(x + 9, y - 5, x + 9, y + 5, CHANGE)] }] : []),
    ...(spec.excluded.length ? [{ label: 'excluded', swatch: (x: number, y: number) => excludedMark(x + 9, y, 2.4) }] : []),
    ...rulesShown.map((id) => ({
      label: rule(id)?.short ?? id,
      swatch: (x: number, y: number): Primitive[] => [signalMark(id, x + 9, y, 3.6)],
    })),
  ];
  let lx = PAD;
  let ly = PAD + TITLE + 13 + 18;
  for (const entry of legend) {
    const w = 18 + 4 + metrics.width(entry.label, SMALL) + 12;
    if (lx + w > width - PAD && lx > PAD) {
      lx = PAD;
      ly += LEGEND_ROW;
    }
    items.push(...entry.swatch(lx, ly - 3));
    text(lx + 22, ly, entry.label, SMALL, 'start', MUTED);
    lx += w;
  }

  // Panels, stacked, sharing the x axis.
  const heights = spec.panels.length > 1 ? [170, 80] : [190];
  let top = ly + 22;
  const frames: PanelFrame[] = spec.panels.map((p, k) => {
    const [lo, hi] = domainOf(p);
    const h = heights[k] ?? 80;
    const frame = { spec: p, top, bottom: top + h, lo, hi, ticks: niceTicks(lo, hi, Math.max(3, Math.round(h / 36)), p.counts) };
    top += h + 26;
    return frame;
  });
  const tickLabel = (f: PanelFrame, v: number) => fmt(v, f.ticks.decimals);
  const leftLabels = Math.max(...frames.flatMap((f) => f.ticks.values.map((v) => metrics.width(tickLabel(f, v), SMALL))));
  const lastLimits = (p: PanelSpec) => {
    for (let i = p.limits.length - 1; i >= 0; i--) if (p.limits[i]) return p.limits[i]!;
    return null;
  };
  const rightTexts = frames.map((f) => limitLabels(lastLimits(f.spec), f.spec.decimals));
  const rightLabels = Math.max(0, ...rightTexts.flat().map((t) => metrics.width(t.text, SMALL)));
  const plotLeft = PAD + leftLabels + 6;
  const plotRight = width - PAD - Math.max(rightLabels + 6, 12);
  const step = (plotRight - plotLeft) / Math.max(n, 1);
  const half = step / 2;
  const x = (i: number) => plotLeft + (i + 0.5) * step;
  const firstTop = frames[0]!.top;
  const lastBottom = frames[frames.length - 1]!.bottom;

  if (spec.period) {
    const x0 = x(spec.period.first) - half;
    items.push({ kind: 'rect', x: x0, y: firstTop, w: x(spec.period.last) + half - x0, h: lastBottom - firstTop, fill: PERIOD, opacity: 0.22 });
  }

  const dotR = Math.max(1.3, Math.min(2.6, step * 0.3));
  const showDots = step >= 3;
  const signalR = Math.max(3.4, dotR * 1.6);
  const excluded = new Set(spec.excluded);
  frames.forEach((f, k) => {
    const y = (v: number) => f.bottom - ((v - f.lo) / (f.hi - f.lo)) * (f.bottom - f.top);
    const clampY = (v: number) => Math.max(f.top, Math.min(f.bottom, y(v)));
    for (const v of f.ticks.values) {
      items.push(line(plotLeft, y(v), plotRight, y(v), { paint: GRID, width: 0.5 }));
      text(plotLeft - 4, y(v) + 3, tickLabel(f, v), SMALL, 'end', MUTED);
    }
    const { limits, values } = f.spec;
    items.push(...rangeBands(f.spec.limitRanges, x, half, clampY));
    for (const b of spec.baselines) {
      if (f.spec.zones) items.push(...zoneBands(b.start, b.end, limits, x, half, clampY));
      const level = (pick: (l: Limits) => number) => stepped(b.start, b.end, (i) => (limits[i] ? pick(limits[i]!) : null), x, half, y);
      const ls = limitStroke(b.kind);
      for (const d of [level((l) => l.ucl), level((l) => l.lcl)]) if (d) items.push({ kind: 'path', d, stroke: ls });
      const c = level((l) => l.center);
      if (c) items.push({ kind: 'path', d: c, stroke: centerStroke(b.kind) });
      const runs: Pt[][] = [[]];
      for (let i = b.start; i < b.end; i++) {
        const v = values[i];
        if (v === null || v === undefined) runs.push([]);
        else runs[runs.length - 1]!.push([x(i), y(v)]);
      }
      const d = pathOf(runs);
      if (d) items.push({ kind: 'path', d, stroke: { paint: SERIES, width: 1.1 } });
    }
    if (k === 0 && spec.shift) {
      const s = spec.shift;
      items.push(line(x(s.start) - half, y(s.before), x(s.at) - half, y(s.before), LEVEL), line(x(s.at) - half, y(s.after), x(s.end - 1) + half, y(s.after), LEVEL));
      const x0 = x(s.interval[0]) - half;
      // Along the foot of the panel, clear of the baseline labels at its head.
      items.push({ kind: 'rect', x: x0, y: f.bottom - 5, w: x(s.interval[1]) + half - x0, h: 4, fill: ESTIMATE, opacity: 0.45 });
      items.push({ kind: 'path', d: shapePath('triangle-up', x(s.at) - half, f.bottom - 5, 3.5), fill: ESTIMATE, stroke: { paint: WHITE, width: 0.6 } });
    }
    const marked = new Map(f.spec.markers.map((m) => [m.index, m.rule]));
    values.forEach((v, i) => {
      if (v === null) return;
      if (excluded.has(i)) items.push(...excludedMark(x(i), y(v), dotR + 0.6));
      else if (!marked.has(i) && showDots) items.push({ kind: 'path', d: circlePath(x(i), y(v), dotR), fill: SERIES });
    });
    for (const [i, id] of marked) {
      const v = values[i];
      if (v !== null && v !== undefined) items.push(signalMark(id, x(i), y(v), signalR));
    }
    items.push(line(plotLeft, f.top, plotLeft, f.bottom, AXIS), line(plotLeft, f.bottom, plotRight, f.bottom, AXIS));
    text(plotLeft, f.top - 6, f.spec.label, SMALL + 0.5, 'start', INK, 600);
    // More points than columns: the line is a min/max overview (see `overview`); say so on the chart.
    if (step * 4 < COLUMN) text(plotRight, f.top - 6, `min/max overview of ${values.length.toLocaleString('en-GB')} points`, SMALL, 'end', MUTED);

    // Limit labels at the right, pushed apart so they never overlap.
    const labels = rightTexts[k]!.map((t) => ({ ...t, at: y(t.value) + 3 }));
    spreadApart(labels, SMALL + 1.5, f.top + SMALL, f.bottom + 3);
    for (const l of labels) text(plotRight + 4, l.at, l.text, SMALL, 'start', l.center ? CENTER : INK);
  });

  // Baseline boundaries across all panels, with the ledger reason that opened them.
  spec.baselines.forEach((b, k) => {
    if (k === 0) return;
    const xb = x(b.start) - half;
    items.push(line(xb, firstTop, xb, lastBottom, BOUNDARY));
    const nextX = k + 1 < spec.baselines.length ? x(spec.baselines[k + 1]!.start) - half : plotRight;
    const label = truncate(metrics, `new baseline${b.reason ? `: ${b.reason}` : ''}`, 7.5, nextX - xb - 8);
    if (label) {
      const w = metrics.width(label, 7.5);
      items.push({ kind: 'rect', x: xb + 1.5, y: firstTop + 2, w: w + 3, h: 10, fill: WHITE, opacity: 0.85 });
      text(xb + 3, firstTop + 9.5, label, 7.5, 'start', MUTED);
    }
  });

  // Recorded changes: a line through the panels, labelled where no baseline label sits already.
  const labelled = new Set(spec.baselines.slice(1).map((b) => b.start));
  spec.changes.forEach((c, k) => {
    const xc = x(c.index) - half;
    items.push(line(xc, firstTop, xc, lastBottom, CHANGE));
    if (labelled.has(c.index)) return;
    const next = Math.min(
      plotRight,
      ...spec.changes.slice(k + 1).map((n) => x(n.index) - half),
      ...spec.baselines.slice(1).filter((b) => b.start > c.index).map((b) => x(b.start) - half),
    );
    const label = truncate(metrics, `change: ${c.reason}`, 7.5, next - xc - 8);
    if (label) {
      const w = metrics.width(label, 7.5);
      items.push({ kind: 'rect', x: xc + 1.5, y: firstTop + 14, w: w + 3, h: 10, fill: WHITE, opacity: 0.85 });
      text(xc + 3, firstTop + 21.5, label, 7.5, 'start', MUTED);
    }
  });

  // The shared x axis: tick marks on every panel, date labels under the last.
  const ticks = dateTicks(spec.dates, x, (l) => metrics.width(l, SMALL));
  for (const t of ticks) {
    for (const f of frames) items.push(line(x(t.index), f.bottom, x(t.index), f.bottom + 3, AXIS));
    const w = metrics.width(t.label, SMALL);
    const cx = Math.min(width - PAD - w / 2, Math.max(PAD + w / 2, x(t.index)));
    text(cx, lastBottom + 14, t.label, SMALL, 'middle', MUTED);
  }

  return { width, height: Math.ceil(lastBottom + 14 + PAD), title: spec.title, desc: spec.desc, items };
}

function limitLabels(l: Limits | null, decimals: number): { text: string; value: number; center: boolean }[] {
  if (!l) return [];
  const out = [
    { text: `UCL ${fmt(l.ucl, decimals)}`, value: l.ucl, center: false },
    { text: `CL ${fmt(l.center, decimals)}`, value: l.center, center: true },
  ];
  if (l.lcl < l.ucl) out.push({ text: `LCL ${fmt(l.lcl, decimals)}`, value: l.lcl, center: false });
  return out;
}

/** Moves label baselines (sorted top to bottom) apart to at least `gap`, within [min, max]. */
function spreadApart(labels: { at: number }[], gap: number, min: number, max: number): void {
  labels.sort((a, b) => a.at - b.at);
  for (let i = 0; i < labels.length; i++) {
    const prev = labels[i - 1];
    labels[i]!.at = Math.max(labels[i]!.at, prev ? prev.at + gap : min);
  }
  for (let i = labels.length - 1; i >= 0; i--) {
    const next = labels[i + 1];
    labels[i]!.at = Math.min(labels[i]!.at, next ? next.at - gap : max);
  }
}

/** Path of a level that may change point by point: flat across each point's slot, stepping at slot edges. */
function stepped(
  start: number,
  end: number,
  level: (i: number) => number | null,
  x: (i: number) => number,
  half: number,
  y: (v: number) => number,
): string {
  const runs: Pt[][] = [];
  let run: Pt[] | null = null;
  let lastY: number | null = null;
  for (let i = start; i < end; i++) {
    const v = level(i);
    if (v === null) {
      run = null;
      continue;
    }
    const yy = y(v);
    if (!run) {
      run = [];
      runs.push(run);
      lastY = null;
    }
    if (lastY !== null && Math.abs(lastY - yy) < 0.005) run[run.length - 1] = [x(i) + half, yy];
    else run.push([x(i) - half, yy], [x(i) + half, yy]);
    lastY = yy;
  }
  return pathOf(runs);
}

/**
 * Rects for a band whose top and bottom may change point by point (`bounds`
 * gives them in points, or null where there is none), merged across
 * consecutive points that share them.
 */
function bands(
  start: number,
  end: number,
  bounds: (i: number) => readonly [number, number] | null,
  x: (i: number) => number,
  half: number,
  fill: Paint,
  opacity: number,
  minHeight = 0,
): Primitive[] {
  const out: Primitive[] = [];
  let open: { x0: number; x1: number; top: number; bottom: number } | null = null;
  const flush = () => {
    if (open) out.push({ kind: 'rect', x: open.x0, y: open.top, w: open.x1 - open.x0, h: Math.max(minHeight, open.bottom - open.top), fill, opacity });
    open = null;
  };
  for (let i = start; i < end; i++) {
    const b = bounds(i);
    if (!b) {
      flush();
      continue;
    }
    const [top, bottom] = b;
    const cur = open as { x0: number; x1: number; top: number; bottom: number } | null;
    if (cur && Math.abs(cur.top - top) <= 0.005 && Math.abs(cur.bottom - bottom) <= 0.005) cur.x1 = x(i) + half;
    else {
      flush();
      open = { x0: x(i) - half, x1: x(i) + half, top, bottom };
    }
  }
  flush();
  return out;
}

/** The ±2σ band, then the ±1σ band over it, clipped to the limits. */
function zoneBands(
  start: number,
  end: number,
  limits: readonly (Limits | null)[],
  x: (i: number) => number,
  half: number,
  y: (v: number) => number,
): Primitive[] {
  return ([
    [2, 0.1],
    [1, 0.16],
  ] as const).flatMap(([k, opacity]) =>
    bands(
      start,
      end,
      (i) => {
        const l = limits[i];
        return l && l.sigma > 0 ? [y(Math.min(l.ucl, l.center + k * l.sigma)), y(Math.max(l.lcl, l.center - k * l.sigma))] : null;
      },
      x,
      half,
      ZONE,
      opacity,
    ),
  );
}

/** Faint bands for the 90 % ranges of the upper and lower limits. */
function rangeBands(ranges: PanelSpec['limitRanges'], x: (i: number) => number, half: number, y: (v: number) => number): Primitive[] {
  return (['ucl', 'lcl'] as const).flatMap((pick) =>
    bands(0, ranges.length, (i) => {
      const r = ranges[i];
      return r ? [y(r[pick][1]), y(r[pick][0])] : null;
    }, x, half, RANGE, 0.08, 0.5),
  );
}

function excludedMark(cx: number, cy: number, r: number): Primitive[] {
  const s = r * 0.6;
  const stroke: Stroke = { paint: MUTED, width: 0.9 };
  return [
    { kind: 'path', d: circlePath(cx, cy, r), fill: WHITE, stroke },
    { kind: 'path', d: `M ${geom(cx - s)} ${geom(cy - s)} L ${geom(cx + s)} ${geom(cy + s)} M ${geom(cx - s)} ${geom(cy + s)} L ${geom(cx + s)} ${geom(cy - s)}`, stroke },
  ];
}

function signalMark(ruleId: string, cx: number, cy: number, r: number): Primitive {
  const style = markerStyle(ruleId);
  return { kind: 'path', d: shapePath(style.shape, cx, cy, r), fill: style.fill, stroke: { paint: WHITE, width: 0.7 } };
}

