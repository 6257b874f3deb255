/**
 * Text measurement shared by the scene layout and every renderer: widths
 * come from the font's own advance widths (fontkit), which is what pdf-lib
 * measures with and what satori lays out with, so a label placed by the
 * scene lands in the same place in the SVG, the PNG and the PDF.
 */
import { fontkit } from '../fontkit.ts';

export type Weight = 400 | 600;

export interface TextMetrics {
  /** Advance width of `text` at `size` points. */
  width(text: string, size: number, weight?: Weight): number;
  /** Distance from the baseline to the top of the line box, per point of size. */
  readonly ascent: number;
  /** Distance from the baseline to the bottom of the line box, per point of size (positive). */
  readonly descent: number;
}

export function createTextMetrics(fonts: { readonly regular: Uint8Array; readonly semibold: Uint8Array }): TextMetrics {
  const faces = { 400: fontkit.create(fonts.regular), 600: fontkit.create(fonts.semibold) } as const;
  const caches = { 400: new Map<string, number>(), 600: new Map<string, number>() };
  const upm = faces[400].unitsPerEm;
  return {
    width(text, size, weight = 400) {
      const cache = caches[weight];
      let units = cache.get(text);
      if (units === undefined) {
        units = faces[weight].layout(text).advanceWidth;
        cache.set(text, units);
      }
      return (units / upm) * size;
    },
    ascent: faces[400].ascent / upm,
    descent: -faces[400].descent / upm,
  };
}

/** Shorten `text` with an ellipsis until it fits `max` points. */
export function truncate(metrics: TextMetrics, text: string, size: number, max: number, weight: Weight = 400): string {
  if (metrics.width(text, size, weight) <= max) return text;
  const chars = [...text];
  let lo = 0;
  let hi = chars.length;
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2);
    if (metrics.width(`${chars.slice(0, mid).join('').trimEnd()}…`, size, weight) <= max) lo = mid;
    else hi = mid - 1;
  }
  return lo === 0 ? '' : `${chars.slice(0, lo).join('').trimEnd()}…`;
}
