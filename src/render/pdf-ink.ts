/**
 * What a PDF page says, as PDF operators (ISO 32000-1: §8.5 paths, §9.4
 * text) collected in a buffer and written as one content stream: the cheap
 * way to put tens of thousands of lines of text on a few thousand pages.
 *
 * The operators name their resources by fixed names (a face's key, an
 * opacity's graphics state by its value) and write text as the font's own
 * glyph numbers, so a page's stream does not depend on the document it goes
 * into: pages can be laid out apart (and kept in the build cache) and
 * joined later. The document embeds each font whole (pdf-font.ts:
 * Identity-H, CID = glyph number), which is what makes glyph numbers the
 * font's own.
 */
import type { RGB } from './pdf-color.ts';
import { decimalText } from '../format.ts';
import { num } from '../pack/pdf-file.ts';
import { type FontkitFont, wordLayoutOf } from './fontkit.ts';
import { cmapText } from './pdf-font.ts';

/** A number for a content stream: at most three decimals, no exponent, no "-0". */
export const pdfNum = num;

export const rgbOperands = (c: RGB) => `${pdfNum(c.red)} ${pdfNum(c.green)} ${pdfNum(c.blue)}`;

/** A font as pages use it: the resource name the document gives it, and the font. */
export interface Face {
  /** The name under /Font in every page's resources, e.g. "F0". */
  readonly key: string;
  readonly font: FontkitFont;
}

/**
 * The font's layout of `text`; where the font lacks a precomposed letter
 * (ḡ, U+1E21, in Plex Sans) and draws .notdef, the decomposed text instead
 * (g and a combining macron), which the font has.
 */
export function shape(font: FontkitFont, text: string): { readonly run: ReturnType<FontkitFont['layout']>; readonly text: string } {
  const run = font.layout(text);
  if (!run.glyphs.some((g) => g.id === 0)) return { run, text };
  const decomposed = text.normalize('NFD');
  return decomposed === text ? { run, text } : { run: font.layout(decomposed), text: decomposed };
}

/** Strings longer than this are encoded each time: sentences seldom repeat, and the cache would hold them all. */
const ENCODE_CACHED_CHARS = 40;

/** A string's glyph numbers, and the text of those whose text the font's cmap does not give (see pdf-font.ts). */
interface Encoded {
  readonly hex: string;
  readonly shaped: readonly (readonly [glyph: number, text: string])[];
}
const encodings = new WeakMap<FontkitFont, Map<string, Encoded>>();
const NONE: Encoded['shaped'] = [];

/** Glyph numbers as four upper-case hex digits, made once each: a plant's PDF writes millions of them. */
const HEX: string[] = [];
const hex4 = (id: number) => (HEX[id] ??= id.toString(16).padStart(4, '0').toUpperCase());

/**
 * `text` as a hex string of the font's glyph numbers, four hex digits each
 * (Identity-H), the glyphs of the font's layout of the text, as pdf-lib's
 * whole-font embedder encodes it; with the glyphs that only shaping made
 * and the text each stands for. The same axis labels, dates and table
 * words come back thousands of times, so short strings are remembered, and
 * any string the caller knows will repeat (`repeats`: a page footer).
 */
export function glyphHex(font: FontkitFont, text: string, repeats = false): Encoded {
  let known = encodings.get(font);
  if (!known) encodings.set(font, (known = new Map()));
  const keep = repeats || text.length <= ENCODE_CACHED_CHARS;
  let e = keep ? known.get(text) : undefined;
  if (e === undefined) {
    const laid = shape(font, text);
    const glyphs = laid.run.glyphs;
    const mapped = cmapText(font);
    const parts = new Array<string>(glyphs.length);
    let shaped: [number, string][] | undefined;
    // The text each glyph stands for: its own character, or the run of characters a ligature joined
    // (those whose layout alone is that one glyph). Not fontkit's glyph.codePoints: a glyph object is
    // shared, and keeps the code points of the first text it was made from in the process.
    const chars = [...laid.text];
    let j = 0;
    for (let i = 0; i < glyphs.length; i++) {
      const g = glyphs[i]!;
      parts[i] = hex4(g.id);
      let t = chars[j] ?? '';
      let k = 1;
      if (glyphs.length < chars.length && mapped.get(g.id) !== t) {
        for (let n = 2; n <= 4 && j + n <= chars.length; n++) {
          const joined = chars.slice(j, j + n).join('');
          const alone = font.layout(joined).glyphs;
          if (alone.length === 1 && alone[0]!.id === g.id) {
            t = joined;
            k = n;
            break;
          }
        }
      }
      j += k;
      // A glyph whose text is not what the cmap says (a ligature: "fi", not "ﬁ"; an alternate form)
      // is noted with its text. Glyph 0 is .notdef, drawn for characters the font lacks: no text.
      if (g.id !== 0 && t !== '' && mapped.get(g.id) !== t) (shaped ??= []).push([g.id, t]);
    }
    e = { hex: `<${parts.join('')}>`, shaped: shaped ?? NONE };
    if (keep) known.set(text, e);
  }
  return e;
}

/**
 * The width of `text` at `size` points, as pdf-lib measures it (the sum of
 * the layout's glyph advances, in thousandths of the size).
 */
export function textWidth(font: FontkitFont, text: string, size: number): number {
  const fast = wordsWidth(font, text);
  if (fast !== undefined) return fast * (size / 1000);
  const glyphs = shape(font, text).run.glyphs;
  const scale = 1000 / font.unitsPerEm;
  let total = 0;
  for (let i = 0; i < glyphs.length; i++) total += glyphs[i]!.advanceWidth * scale;
  return total * (size / 1000);
}

/** Each word's glyph advances in thousandths of the em, in order; null where the font draws .notdef (shape's other layout then). */
const MAX_WORDS = 200_000;
const wordAdvances = new WeakMap<FontkitFont, Map<string, Float64Array | null>>();

/**
 * textWidth's sum without the joined run, for a font whose layout of a line
 * is its words' runs with the space's between (fontkit.ts): the same
 * advances added in the same order, so the same number. A plant's footers
 * ("Page 12 of 2194", each new) took 0.1 s to lay out joined.
 */
function wordsWidth(font: FontkitFont, text: string): number | undefined {
  const word = wordLayoutOf(font);
  if (!word) return undefined;
  let known = wordAdvances.get(font);
  if (!known || known.size >= MAX_WORDS) wordAdvances.set(font, (known = new Map()));
  const scale = 1000 / font.unitsPerEm;
  let total = 0;
  const add = (w: string) => {
    let a = known.get(w);
    if (a === undefined) {
      const glyphs = word(w).glyphs;
      a = glyphs.some((g) => g.id === 0) ? null : Float64Array.from(glyphs, (g) => g.advanceWidth * scale);
      known.set(w, a);
    }
    if (a === null) return false;
    for (let i = 0; i < a.length; i++) total += a[i]!;
    return true;
  };
  // As fontkit.ts's layout joins a line: a text without a space (or a lone space) is one word.
  if (!text.includes(' ') || text === ' ') return add(text) ? total : undefined;
  const parts = text.split(' ');
  for (let i = 0; i < parts.length; i++) {
    if (i > 0 && !add(' ')) return undefined;
    if (parts[i] !== '' && !add(parts[i]!)) return undefined;
  }
  return total;
}

/** The graphics-state resource name of fill and stroke opacity `o` (its value, so every page names it alike). */
export const opacityKey = (o: number) => `A${decimalText(o, 4).replace('.', '_').replace('-', 'm')}`;

/** A page's drawing, before it is in a document. */
export class SheetInk {
  private readonly ops: string[] = [];
  /** Opacities used, for the document's graphics-state resources. */
  readonly opacities = new Set<number>();
  /** Glyphs drawn whose text is not what the font's cmap gives, by face key: glyph number → text (for the ToUnicode map). */
  readonly shaped = new Map<string, Map<number, string>>();

  /** One line of text with its baseline starting at (x, y). */
  /** `repeats`: the same text is drawn on many sheets (see glyphHex). */
  text(text: string, x: number, y: number, size: number, face: Face, color: RGB, repeats = false): void {
    const e = glyphHex(face.font, text, repeats);
    if (e.shaped.length) {
      let m = this.shaped.get(face.key);
      if (!m) this.shaped.set(face.key, (m = new Map()));
      for (const [g, t] of e.shaped) if (!m.has(g)) m.set(g, t);
    }
    this.ops.push(`${rgbOperands(color)} rg BT /${face.key} ${pdfNum(size)} Tf 1 0 0 1 ${pdfNum(x)} ${pdfNum(y)} Tm ${e.hex} Tj ET`);
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
    if (style.opacity !== undefined) {
      this.opacities.add(style.opacity);
      ops.push(`/${opacityKey(style.opacity)} gs`);
    }
    if (style.fill) ops.push(`${rgbOperands(style.fill)} rg`);
    if (style.stroke) ops.push(`${rgbOperands(style.stroke)} RG`, `${pdfNum(style.width ?? 1)} w`);
    if (style.dash) ops.push(`[${style.dash.map(pdfNum).join(' ')}] 0 d`);
    ops.push(construct, paint, 'Q');
    this.ops.push(ops.join('\n'));
  }

  /** Draws the form (a Form XObject of the page's resources) named `name`. */
  form(name: string): void {
    this.ops.push(`/${name} Do`);
  }

  get empty(): boolean {
    return this.ops.length === 0;
  }

  /** What was drawn, as one content stream's text in its own graphics state ('' if nothing was). */
  content(): string {
    return this.ops.length === 0 ? '' : `q\n${this.ops.join('\n')}\nQ\n`;
  }
}
