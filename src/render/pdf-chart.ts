/**
 * Draws a chart scene straight onto a PDF page as vector paths and real text
 * (no raster), with the same font the scene was measured with. Scene units
 * are points from the top left; the page's origin is the bottom left.
 *
 * The chart is written as one content stream of PDF operators (ISO 32000-1,
 * §8.5 paths, §9.4 text), not through pdf-lib's drawing calls: those build
 * an object per operator and number, parse the path data again and add a
 * font entry to the page per label, which made the PDF most of a
 * 1,000-characteristic build. The operators go onto a sheet (pdf-ink.ts),
 * which names its fonts and graphics states the same in every document.
 */
import { rgb } from './pdf-color.ts';
import { type Face, type SheetInk, pdfNum as num } from './pdf-ink.ts';
import type { Paint, Scene } from './scene/types.ts';

export interface PdfFaces {
  readonly regular: Face;
  readonly semibold: Face;
}

/** A paint (`#rrggbb`) as pdf-lib's colour, 0–1 per channel. */
const rgbOf = (p: Paint) => {
  const n = Number.parseInt(p.slice(1), 16);
  return rgb(((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255);
};

/** Scene path data (absolute M, L, C, Z; see scene/types.ts) as path operators in page space. */
function pathOps(d: string, tx: (x: number) => number, ty: (y: number) => number): string {
  const tokens = d.match(/[MLCZ]|-?\d*\.?\d+(?:e[-+]?\d+)?/g) ?? [];
  const out: string[] = [];
  let i = 0;
  const pair = () => {
    const x = Number(tokens[i++]);
    const y = Number(tokens[i++]);
    return `${num(tx(x))} ${num(ty(y))}`;
  };
  while (i < tokens.length) {
    const cmd = tokens[i++];
    if (cmd === 'M') out.push(`${pair()} m`);
    else if (cmd === 'L') out.push(`${pair()} l`);
    else if (cmd === 'C') out.push(`${pair()} ${pair()} ${pair()} c`);
    else if (cmd === 'Z') out.push('h');
    else throw new Error(`internal: scene path data has "${cmd}"`);
  }
  return out.join('\n');
}

/** Draws `scene` onto the sheet with its top-left corner at (`x`, `top`) in page coordinates, scaled by `scale`. */
export function drawScene(ink: SheetInk, scene: Scene, at: { x: number; top: number; scale: number }, fonts: PdfFaces): void {
  const { x, top, scale } = at;
  const tx = (v: number) => x + v * scale;
  const ty = (v: number) => top - v * scale;
  for (const p of scene.items) {
    switch (p.kind) {
      case 'rect':
        ink.path(`${num(tx(p.x))} ${num(ty(p.y + p.h))} ${num(p.w * scale)} ${num(p.h * scale)} re`, 'f', {
          fill: rgbOf(p.fill),
          ...(p.opacity !== undefined ? { opacity: p.opacity } : {}),
        });
        break;
      case 'path': {
        // As pdf-lib's drawSvgPath: a path with neither fill nor stroke is filled black.
        const fill = p.fill ?? (p.stroke ? undefined : '#000000');
        ink.path(pathOps(p.d, tx, ty), fill && p.stroke ? 'B' : fill ? 'f' : 'S', {
          ...(fill ? { fill: rgbOf(fill) } : {}),
          ...(p.stroke
            ? { stroke: rgbOf(p.stroke.paint), width: p.stroke.width * scale, ...(p.stroke.dash ? { dash: p.stroke.dash.map((v) => v * scale) } : {}) }
            : {}),
          ...(p.opacity !== undefined ? { opacity: p.opacity } : {}),
        });
        break;
      }
      case 'text': {
        const left = p.anchor === 'start' ? p.x : p.anchor === 'middle' ? p.x - p.width / 2 : p.x - p.width;
        ink.text(p.text, tx(left), ty(p.y), p.size * scale, p.weight === 600 ? fonts.semibold : fonts.regular, rgbOf(p.fill));
        break;
      }
    }
  }
}
