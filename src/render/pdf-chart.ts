/**
 * Draws a chart scene straight onto a PDF page as vector paths and real text
 * (no raster), with the same font the scene was measured with. Scene units
 * are points from the top left; the page's origin is the bottom left.
 *
 * The chart is written as one content stream of PDF operators (ISO 32000-1,
 * §8.5 paths, §9.4 text), not through pdf-lib's drawing calls: those build
 * an object per operator and number, parse the path data again and add a
 * font entry to the page per label, which made the PDF most of a
 * 1,000-characteristic build. pdf-lib still owns the document, the fonts
 * (its subset embedder encodes the text) and the page resources.
 */
import { type PDFFont, type PDFPage, rgb } from 'pdf-lib';
import { pdfNum as num, rgbOperands } from './pdf-ink.ts';
import type { Paint, Primitive, Scene } from './scene/types.ts';

export interface PdfFonts {
  readonly regular: PDFFont;
  readonly semibold: PDFFont;
}

/** The colour operands of a paint, 0–1 per channel. */
const rgbOf = (p: Paint): string => {
  const n = Number.parseInt(p.slice(1), 16);
  return rgbOperands(rgb(((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255));
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

/** Draws `scene` with its top-left corner at (`x`, `top`) in page coordinates, scaled by `scale`. */
export function drawScene(page: PDFPage, scene: Scene, at: { x: number; top: number; scale: number }, fonts: PdfFonts): void {
  const { x, top, scale } = at;
  const tx = (v: number) => x + v * scale;
  const ty = (v: number) => top - v * scale;
  const doc = page.doc;
  const fontKeys = new Map<PDFFont, string>();
  const fontKey = (f: PDFFont) => {
    let k = fontKeys.get(f);
    if (!k) fontKeys.set(f, (k = page.node.newFontDictionary(f.name, f.ref).toString()));
    return k;
  };
  const alphaKeys = new Map<number, string>();
  const alpha = (o: number) => {
    let k = alphaKeys.get(o);
    if (!k) {
      const state = doc.context.obj({ Type: 'ExtGState', ca: o, CA: o });
      alphaKeys.set(o, (k = page.node.newExtGState('GS', doc.context.register(state)).toString()));
    }
    return k;
  };
  const ops: string[] = ['q'];
  const draw = (p: Primitive) => {
    switch (p.kind) {
      case 'rect':
        ops.push('q');
        if (p.opacity !== undefined) ops.push(`${alpha(p.opacity)} gs`);
        ops.push(`${rgbOf(p.fill)} rg`, `${num(tx(p.x))} ${num(ty(p.y + p.h))} ${num(p.w * scale)} ${num(p.h * scale)} re`, 'f', 'Q');
        break;
      case 'path': {
        ops.push('q');
        if (p.opacity !== undefined) ops.push(`${alpha(p.opacity)} gs`);
        // As pdf-lib's drawSvgPath: a path with neither fill nor stroke is filled black.
        const fill = p.fill ?? (p.stroke ? undefined : '#000000');
        if (fill) ops.push(`${rgbOf(fill)} rg`);
        if (p.stroke) {
          ops.push(`${rgbOf(p.stroke.paint)} RG`, `${num(p.stroke.width * scale)} w`);
          if (p.stroke.dash) ops.push(`[${p.stroke.dash.map((v) => num(v * scale)).join(' ')}] 0 d`);
        }
        ops.push(pathOps(p.d, tx, ty), fill && p.stroke ? 'B' : fill ? 'f' : 'S', 'Q');
        break;
      }
      case 'text': {
        const left = p.anchor === 'start' ? p.x : p.anchor === 'middle' ? p.x - p.width / 2 : p.x - p.width;
        const font = p.weight === 600 ? fonts.semibold : fonts.regular;
        ops.push(
          `${rgbOf(p.fill)} rg`,
          'BT',
          `${fontKey(font)} ${num(p.size * scale)} Tf`,
          `1 0 0 1 ${num(tx(left))} ${num(ty(p.y))} Tm`,
          `${font.encodeText(p.text).toString()} Tj`,
          'ET',
        );
        break;
      }
    }
  };
  for (const p of scene.items) draw(p);
  ops.push('Q');
  page.node.addContentStream(doc.context.register(doc.context.flateStream(`${ops.join('\n')}\n`)));
}
