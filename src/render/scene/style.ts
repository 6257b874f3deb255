/**
 * plumbline's visual language. Colours come from the Okabe–Ito palette
 * (Okabe & Ito, "Color Universal Design", 2008), chosen to stay distinct for
 * the common forms of colour-blindness; nothing is told apart by colour
 * alone: limit kinds differ by dash pattern, signal rules by marker shape.
 */
import { geom } from '../../format.ts';
import type { Paint, Stroke } from './types.ts';
import type { LimitKind } from './spec.ts';

export const INK: Paint = '#1f1f1f';
export const MUTED: Paint = '#5c5c5c';
export const GRID: Paint = '#e4e4e4';
export const SERIES: Paint = '#0072b2';
export const CENTER: Paint = '#009e73';
export const ZONE: Paint = '#56b4e9';
export const PERIOD: Paint = '#f0e442';
export const WHITE: Paint = '#ffffff';

/** Limit lines: frozen solid, trial dashed, standard values dash-dot. */
export function limitStroke(kind: LimitKind): Stroke {
  switch (kind) {
    case 'frozen':
      return { paint: INK, width: 1.1 };
    case 'trial':
      return { paint: INK, width: 1.1, dash: [5, 3] };
    case 'standard':
      return { paint: INK, width: 1.1, dash: [7, 2, 1.5, 2] };
  }
}

export function centerStroke(kind: LimitKind): Stroke {
  return kind === 'trial' ? { paint: CENTER, width: 1.1, dash: [5, 3] } : { paint: CENTER, width: 1.1 };
}

export const BOUNDARY: Stroke = { paint: MUTED, width: 0.8, dash: [2, 2] };
/** Levels before and after an estimated change: grey, heavier and with longer dashes than trial limits. */
export const LEVEL: Stroke = { paint: MUTED, width: 1.6, dash: [9, 3] };
/** The plausible range of an estimated change point. */
export const ESTIMATE: Paint = MUTED;
/** The 90 % range of trial limits. */
export const RANGE: Paint = '#1f1f1f';

/** A recorded process change: a finer dot than a baseline boundary, in the palette's orange. */
export const CHANGE: Stroke = { paint: '#e69f00', width: 1.2, dash: [1, 2.5] };

export type Shape = 'diamond' | 'triangle-up' | 'triangle-down' | 'square' | 'triangle-right' | 'hexagon' | 'bowtie' | 'star';

export interface MarkerStyle {
  readonly shape: Shape;
  readonly fill: Paint;
}

/** One shape and colour per rule; rules that share a family of pattern share a colour. */
export const RULE_MARKERS: Readonly<Record<string, MarkerStyle>> = {
  'beyond-limits': { shape: 'diamond', fill: '#d55e00' },
  'two-of-three-beyond-2-sigma': { shape: 'triangle-up', fill: '#e69f00' },
  'four-of-five-beyond-1-sigma': { shape: 'triangle-down', fill: '#e69f00' },
  'run-8-one-side': { shape: 'square', fill: '#cc79a7' },
  'run-9-one-side': { shape: 'square', fill: '#cc79a7' },
  'trend-6': { shape: 'triangle-right', fill: '#cc79a7' },
  'alternating-14': { shape: 'bowtie', fill: '#000000' },
  'stratification-15-within-1-sigma': { shape: 'hexagon', fill: '#000000' },
  'mixture-8-beyond-1-sigma': { shape: 'star', fill: '#000000' },
};

export function markerStyle(rule: string): MarkerStyle {
  return RULE_MARKERS[rule] ?? { shape: 'diamond', fill: '#d55e00' };
}

function polygon(points: readonly (readonly [number, number])[]): string {
  return `${points.map(([x, y], i) => `${i === 0 ? 'M' : 'L'} ${geom(x)} ${geom(y)}`).join(' ')} Z`;
}

function regular(cx: number, cy: number, r: number, sides: number, turn: number): string {
  return polygon(Array.from({ length: sides }, (_, k) => {
    const a = turn + (2 * Math.PI * k) / sides;
    return [cx + r * Math.cos(a), cy + r * Math.sin(a)] as const;
  }));
}

/** Path data of a marker of radius `r` centred on (cx, cy). */
export function shapePath(shape: Shape, cx: number, cy: number, r: number): string {
  switch (shape) {
    case 'diamond':
      return polygon([[cx, cy - r * 1.25], [cx + r, cy], [cx, cy + r * 1.25], [cx - r, cy]]);
    case 'triangle-up':
      return regular(cx, cy + r * 0.15, r * 1.15, 3, -Math.PI / 2);
    case 'triangle-down':
      return regular(cx, cy - r * 0.15, r * 1.15, 3, Math.PI / 2);
    case 'triangle-right':
      return regular(cx - r * 0.15, cy, r * 1.15, 3, 0);
    case 'square':
      return polygon([[cx - r * 0.85, cy - r * 0.85], [cx + r * 0.85, cy - r * 0.85], [cx + r * 0.85, cy + r * 0.85], [cx - r * 0.85, cy + r * 0.85]]);
    case 'hexagon':
      return regular(cx, cy, r, 6, 0);
    case 'bowtie':
      return polygon([[cx - r, cy - r], [cx + r, cy + r], [cx + r, cy - r], [cx - r, cy + r]]);
    case 'star':
      return polygon(Array.from({ length: 10 }, (_, k) => {
        const a = -Math.PI / 2 + (Math.PI * k) / 5;
        const rr = k % 2 === 0 ? r * 1.2 : r * 0.5;
        return [cx + rr * Math.cos(a), cy + rr * Math.sin(a)] as const;
      }));
  }
}

/** A circle as four cubic Béziers (pdf-lib and SVG draw it the same way). */
export function circlePath(cx: number, cy: number, r: number): string {
  const k = 0.5523 * r;
  const p = (x: number, y: number) => `${geom(x)} ${geom(y)}`;
  return [
    `M ${p(cx + r, cy)}`,
    `C ${p(cx + r, cy + k)} ${p(cx + k, cy + r)} ${p(cx, cy + r)}`,
    `C ${p(cx - k, cy + r)} ${p(cx - r, cy + k)} ${p(cx - r, cy)}`,
    `C ${p(cx - r, cy - k)} ${p(cx - k, cy - r)} ${p(cx, cy - r)}`,
    `C ${p(cx + k, cy - r)} ${p(cx + r, cy - k)} ${p(cx + r, cy)} Z`,
  ].join(' ');
}
