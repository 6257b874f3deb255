/**
 * A chart scene: everything a renderer draws, already positioned, in points
 * (1 unit = 1 pt = 1 CSS px), origin at the top left. Renderers map these
 * primitives to SVG elements, satori nodes or pdf-lib calls and decide
 * nothing themselves: no statistics, no positions, no collisions.
 */
import type { Weight } from './text-metrics.ts';

/** A colour as `#rrggbb`. */
export type Paint = `#${string}`;

export interface Stroke {
  readonly paint: Paint;
  readonly width: number;
  /** Dash and gap lengths in points; absent for a solid line. */
  readonly dash?: readonly number[];
}

export type Primitive =
  | {
      readonly kind: 'path';
      /** SVG path data in absolute M/L/C/Z commands, numbers joined by single spaces. */
      readonly d: string;
      readonly stroke?: Stroke;
      readonly fill?: Paint;
      readonly opacity?: number;
    }
  | { readonly kind: 'rect'; readonly x: number; readonly y: number; readonly w: number; readonly h: number; readonly fill: Paint; readonly opacity?: number }
  | {
      readonly kind: 'text';
      /** Anchor point; y is the baseline. */
      readonly x: number;
      readonly y: number;
      readonly text: string;
      readonly size: number;
      readonly weight: Weight;
      readonly anchor: 'start' | 'middle' | 'end';
      /** Measured advance width, so renderers can place start-aligned boxes without measuring. */
      readonly width: number;
      readonly fill: Paint;
    };

export interface Scene {
  readonly width: number;
  readonly height: number;
  /** Short accessible name: the chart's title. */
  readonly title: string;
  /** A sentence or two summarising what the chart shows, for `<desc>` and screen readers. */
  readonly desc: string;
  readonly items: readonly Primitive[];
}
