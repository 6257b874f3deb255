/**
 * @pdf-lib/fontkit ships a UMD bundle, loaded here with `require`, while
 * its type declarations describe an ES module. This adapter gives the rest
 * of the code the typed module.
 *
 * It also remembers each font's word layouts. Shaping (kerning, ligatures)
 * is fontkit's costly step, and pdf-lib shapes a string twice (to measure it
 * and to encode it) and again wherever it repeats, so a 1,000-characteristic
 * pack spent most of its PDF time there. A layout depends only on the font
 * and the text (no features are passed here), and callers only read it.
 */
import { createRequire } from 'node:module';
import type * as ns from '@pdf-lib/fontkit';
import { pairRuns } from './pair-runs.ts';

export type FontkitModule = typeof ns;
export type FontkitFont = ReturnType<typeof ns.create>;

// Loaded with `require`: it ships CommonJS, and an ESM import had Node's CommonJS lexer read the
// whole bundle first (256–264 ms against 146–160 ms, on the main thread and the pages worker alike).
const raw: FontkitModule = createRequire(import.meta.url)('@pdf-lib/fontkit') as FontkitModule;

/** fontkit without the remembered layouts: full shaping of every string, spaces included (kerning pairs with a space kept). */
export const shapingFontkit: FontkitModule = raw;

/** Word layouts kept per font; past this the memory is better spent elsewhere, and the map starts over. */
const MAX_LAYOUTS = 200_000;

type Run = ReturnType<FontkitFont['layout']>;

/** The remembered word layout of each font made here (`font.layout` of a line is its words' joined). */
const wordLayouts = new WeakMap<FontkitFont, (word: string) => Run>();

/**
 * The word layouts `font.layout` joins, if it is a font made here: a line's
 * layout is its words' with the space's between, so a caller may walk its
 * words instead of asking for the joined run.
 */
export const wordLayoutOf = (font: FontkitFont): ((word: string) => Run) | undefined => wordLayouts.get(font);

function rememberLayouts(font: FontkitFont): FontkitFont {
  const shape = font.layout.bind(font) as (text: string, ...rest: unknown[]) => Run;
  // Figures, most of the words and nearly all seen once, are laid out from their pairs (pair-runs.ts).
  const figure = pairRuns(font, shape);
  let known = new Map<string, Run>();
  const word = (text: string): Run => {
    let run = known.get(text);
    if (run === undefined) {
      if (known.size >= MAX_LAYOUTS) known = new Map();
      run = figure(text) ?? shape(text);
      known.set(text, run);
    }
    return run;
  };
  wordLayouts.set(font, word);
  font.layout = ((text: string, ...rest: unknown[]) => {
    if (rest.some((r) => r !== undefined)) return shape(text, ...rest);
    if (!text.includes(' ') || text === ' ') return word(text);
    // A line of words is its words' runs joined by the space's: nearly every
    // line is new, but its words are not. Latin text has no ligature or
    // contextual form across a space; only a kerning pair with the space
    // itself is lost, and pdf-lib ignores kerning anyway (it draws and
    // measures by glyph advances).
    const space = word(' ');
    const glyphs: Run['glyphs'] = [];
    const positions: Run['positions'] = [];
    let advanceWidth = 0;
    text.split(' ').forEach((part, i) => {
      if (i > 0) {
        glyphs.push(...space.glyphs);
        positions.push(...space.positions);
        advanceWidth += space.advanceWidth;
      }
      if (part === '') return;
      const run = word(part);
      glyphs.push(...run.glyphs);
      positions.push(...run.positions);
      advanceWidth += run.advanceWidth;
    });
    return { glyphs, positions, advanceWidth } as unknown as Run;
  }) as FontkitFont['layout'];
  return font;
}

/**
 * One font object per font file: the scene's text metrics and every PDF
 * share it (pdf-lib asks for one per document), so the font's tables are
 * parsed once and a word measured for a chart label is already shaped when
 * the PDF draws it. Both read layouts the same way (no features). pdf-lib
 * keeps its subset apart from the font object, so documents do not share
 * glyph numbers. Measured on the PDF stage of 100 characteristics, the
 * first in a process: 1.63–1.81 s against 1.74–2.30 s with a font each.
 */
const opened = new WeakMap<object, FontkitFont>();

function create(...args: Parameters<FontkitModule['create']>): FontkitFont {
  const [data, postscriptName] = args;
  if (postscriptName !== undefined || typeof data !== 'object' || data === null) return rememberLayouts(raw.create(...args));
  let font = opened.get(data);
  if (!font) opened.set(data, (font = rememberLayouts(raw.create(...args))));
  return font;
}

export const fontkit: FontkitModule = { ...raw, create: create as FontkitModule['create'] };
