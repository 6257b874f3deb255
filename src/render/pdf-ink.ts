/**
 * What a PDF page says, as PDF operators (ISO 32000-1: §8.5 paths, §9.4
 * text) collected in a buffer and written as one content stream: the cheap
 * way to put tens of thousands of lines of text on a few thousand pages.
 * pdf-lib's drawing calls build objects per operator and per number and add
 * a font entry to the page for every string drawn; pdf-lib still owns the
 * document, embeds the fonts and encodes the text (its subset embedder).
 */
import type { PDFFont, PDFPage, RGB } from 'pdf-lib';
import { decimalText } from '../format.ts';

/** A number for a content stream: at most three decimals, no exponent, no "-0". */
export function pdfNum(v: number): string {
  if (!Number.isFinite(v)) throw new Error(`internal: non-finite PDF number ${v}`);
  return decimalText(v, 3);
}

export const rgbOperands = (c: RGB) => `${pdfNum(c.red)} ${pdfNum(c.green)} ${pdfNum(c.blue)}`;

/** Strings longer than this are encoded each time: sentences seldom repeat, and the cache would hold them all. */
const ENCODE_CACHED_CHARS = 40;
const encodings = new WeakMap<PDFFont, Map<string, string>>();

/**
 * `font.encodeText(text)` as it appears in a content stream. pdf-lib shapes
 * the text again on every call (a fontkit layout, most of the PDF stage's
 * time on a plant); the same axis labels, dates and table words come back
 * thousands of times. The result depends only on the text and the glyphs
 * already in the font's subset, and a repeated call adds no glyph, so the
 * first call's result is every later call's.
 */
export function encoded(font: PDFFont, text: string): string {
  if (text.length > ENCODE_CACHED_CHARS) return font.encodeText(text).toString();
  let known = encodings.get(font);
  if (!known) encodings.set(font, (known = new Map()));
  let hex = known.get(text);
  if (hex === undefined) known.set(text, (hex = font.encodeText(text).toString()));
  return hex;
}

export class PageInk {
  private readonly ops: string[] = [];
  private readonly fontKeys = new Map<PDFFont, string>();
  private readonly alphaKeys = new Map<number, string>();

  constructor(private readonly page: PDFPage) {}

  /** The page's graphics-state resource for fill and stroke opacity `o`, made once per page and value. */
  private alpha(o: number): string {
    let k = this.alphaKeys.get(o);
    if (!k) {
      const ctx = this.page.doc.context;
      this.alphaKeys.set(o, (k = this.page.node.newExtGState('GS', ctx.register(ctx.obj({ Type: 'ExtGState', ca: o, CA: o }))).toString()));
    }
    return k;
  }

  private fontKey(f: PDFFont): string {
    let k = this.fontKeys.get(f);
    if (!k) this.fontKeys.set(f, (k = this.page.node.newFontDictionary(f.name, f.ref).toString()));
    return k;
  }

  /** One line of text with its baseline starting at (x, y). */
  text(text: string, x: number, y: number, size: number, font: PDFFont, color: RGB): void {
    this.ops.push(`${rgbOperands(color)} rg BT ${this.fontKey(font)} ${pdfNum(size)} Tf 1 0 0 1 ${pdfNum(x)} ${pdfNum(y)} Tm ${encoded(font, text)} Tj ET`);
  }

  /** A filled rectangle; (x, y) is its lower-left corner. */
  rect(x: number, y: number, w: number, h: number, color: RGB): void {
    this.ops.push(`${rgbOperands(color)} rg ${pdfNum(x)} ${pdfNum(y)} ${pdfNum(w)} ${pdfNum(h)} re f`);
  }

  /** A straight stroke. */
  line(x1: number, y1: number, x2: number, y2: number, thickness: number, color: RGB): void {
    this.ops.push(`q ${rgbOperands(color)} RG ${pdfNum(thickness)} w ${pdfNum(x1)} ${pdfNum(y1)} m ${pdfNum(x2)} ${pdfNum(y2)} l S Q`);
  }

  /**
   * Path operators already in page space (`m`, `l`, `c`, `re`, `h`), painted
   * with `paint` ('f' fill, 'S' stroke, 'B' both) in its own graphics state.
   */
  path(construct: string, paint: 'f' | 'S' | 'B', style: { fill?: RGB; stroke?: RGB; width?: number; dash?: readonly number[]; opacity?: number }): void {
    const ops = ['q'];
    if (style.opacity !== undefined) ops.push(`${this.alpha(style.opacity)} gs`);
    if (style.fill) ops.push(`${rgbOperands(style.fill)} rg`);
    if (style.stroke) ops.push(`${rgbOperands(style.stroke)} RG`, `${pdfNum(style.width ?? 1)} w`);
    if (style.dash) ops.push(`[${style.dash.map(pdfNum).join(' ')}] 0 d`);
    ops.push(construct, paint, 'Q');
    this.ops.push(ops.join('\n'));
  }

  /** Writes what was drawn as one content stream of the page (nothing if nothing was). */
  flush(): void {
    if (this.ops.length === 0) return;
    const ctx = this.page.doc.context;
    this.page.node.addContentStream(ctx.register(ctx.flateStream(`q\n${this.ops.join('\n')}\nQ\n`)));
    this.ops.length = 0;
  }
}
