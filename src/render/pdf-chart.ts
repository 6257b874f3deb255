/**
 * Draws a chart scene straight onto a PDF page as vector paths and real text
 * (no raster), with the same font the scene was measured with. Scene units
 * are points from the top left; pdf-lib's page origin is the bottom left, and
 * drawSvgPath flips y itself when placed at the chart's top-left corner.
 */
import { type PDFFont, type PDFPage, rgb } from 'pdf-lib';
import type { Paint, Scene } from './scene/types.ts';

export interface PdfFonts {
  readonly regular: PDFFont;
  readonly semibold: PDFFont;
}

export function paint(p: Paint) {
  const n = Number.parseInt(p.slice(1), 16);
  return rgb(((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255);
}

/** Draws `scene` with its top-left corner at (`x`, `top`) in page coordinates, scaled by `scale`. */
export function drawScene(page: PDFPage, scene: Scene, at: { x: number; top: number; scale: number }, fonts: PdfFonts): void {
  const { x, top, scale } = at;
  for (const p of scene.items) {
    switch (p.kind) {
      case 'rect':
        page.drawRectangle({
          x: x + p.x * scale,
          y: top - (p.y + p.h) * scale,
          width: p.w * scale,
          height: p.h * scale,
          color: paint(p.fill),
          ...(p.opacity !== undefined ? { opacity: p.opacity } : {}),
        });
        break;
      case 'path':
        page.drawSvgPath(p.d, {
          x,
          y: top,
          scale,
          ...(p.fill ? { color: paint(p.fill) } : {}),
          ...(p.stroke
            ? { borderColor: paint(p.stroke.paint), borderWidth: p.stroke.width, ...(p.stroke.dash ? { borderDashArray: [...p.stroke.dash] } : {}) }
            : {}),
          ...(p.opacity !== undefined ? { opacity: p.opacity, borderOpacity: p.opacity } : {}),
        });
        break;
      case 'text': {
        const left = p.anchor === 'start' ? p.x : p.anchor === 'middle' ? p.x - p.width / 2 : p.x - p.width;
        page.drawText(p.text, {
          x: x + left * scale,
          y: top - p.y * scale,
          size: p.size * scale,
          font: p.weight === 600 ? fonts.semibold : fonts.regular,
          color: paint(p.fill),
        });
        break;
      }
    }
  }
}
