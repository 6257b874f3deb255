/**
 * @pdf-lib/fontkit ships a UMD bundle, loaded here with `require`, while
 * its type declarations describe an ES module. This adapter gives the rest
 * of the code the typed module.
 *
 * It also remembers each font's word layouts. Shaping (kerning, ligatures)
 * is fontkit's costly step, and pdf-lib shapes a string twice (to measure it
 * and to encode it) and again wherever it repeats, so a 1,000-characteristic
 * pack spent most of its PDF time there. A layout depends only on the font
 * and the text (no features are passed here), and callers only read it; so
 * the words a build shaped whole, and its pairs of figures, can be kept for
 * the next build of the same font file (rememberWords, wordsShaped).
 */
import type * as ns from '@pdf-lib/fontkit';
import { loadFontkit } from './fontkit-load.ts';
import { type Nudge, pairRuns, plainCharacters } from './pair-runs.ts';

export type FontkitModule = typeof ns;
export type FontkitFont = ReturnType<typeof ns.create>;

// Loaded as CommonJS: an ESM import had Node's CommonJS lexer read the whole bundle first (256–264 ms
// against 146–160 ms, on the main thread and the pages worker alike); and through fontkit-load.ts,
// which leaves out what loading it costs plumbline for nothing.
const raw: FontkitModule = loadFontkit<FontkitModule>();

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

/**
 * A word's layout as an earlier build kept it: its glyph numbers, each
 * glyph's code points, the four fields of each position (x advance,
 * y advance, x offset, y offset) and the advance width.
 */
export interface StoredRun {
  readonly ids: readonly number[];
  readonly codePoints: readonly (readonly number[])[];
  readonly positions: readonly number[];
  readonly advanceWidth: number;
  /** Builds since one last used the word (0: the build that kept it); past MAX_AGE it is no longer kept. */
  readonly age?: number;
}

/**
 * How many builds a word is kept unused: a rebuild lays out only the pages
 * whose text changed, and the overview's words, unused by a rebuild where
 * nothing changed, are wanted again by the next one where something did.
 */
const MAX_AGE = 4;

/**
 * What a font laid out that a later build can take as it is: the words it
 * shaped whole, and its pairs of plain characters (pair-runs.ts, by
 * pairKey: what each adds to its first glyph's position, or null).
 */
export interface StoredLayouts {
  readonly words: ReadonlyMap<string, StoredRun>;
  readonly pairs: ReadonlyMap<number, Nudge | null>;
  /** The font's plain characters (pair-runs.ts, plainCharacters): reading them from its tables took 15 ms a face. */
  readonly plain: readonly number[];
}

/** A font's layouts for a later build (`fresh`: how many words and pairs fontkit laid out here, rather than taken from an earlier build, and kept words left unused). */
export interface ShapedWords extends StoredLayouts {
  readonly fresh: number;
}

/** Layouts kept by an earlier build, by the font file they were made with (rememberWords). */
const storedFor = new WeakMap<object, StoredLayouts>();
/** What each font file's font laid out (or took from storedFor) in this process: its words shaped whole, with their runs, and its pairs. */
const shapedFor = new WeakMap<object, { readonly runs: Map<string, Run>; fresh: number; readonly pairs: Map<number, Nudge | null>; readonly storedPairs: number; readonly plain: ReadonlySet<number> }>();

/**
 * Layouts an earlier build made with the font file `data` (the same bytes:
 * the caller checks), taken instead of shaping those words again. A rebuild
 * lays out the pack's global pages afresh, and fontkit took 0.15–0.2 s of
 * it to shape their words, the same words each time. Given before the font
 * of `data` is made (`fontkit.create`), which reads the pairs and plain
 * characters once; a font made earlier in the process keeps its own.
 */
export function rememberWords(data: Uint8Array, layouts: StoredLayouts): void {
  storedFor.set(data, layouts);
}

/** The words the font of `data` shaped whole in this process, as an earlier build's would be kept; undefined if no font of it was made. */
export function wordsShaped(data: Uint8Array): ShapedWords | undefined {
  const shaped = shapedFor.get(data);
  if (!shaped) return undefined;
  const words = new Map<string, StoredRun>();
  for (const [text, run] of shaped.runs) {
    const positions: number[] = [];
    for (const p of run.positions) positions.push(p.xAdvance, p.yAdvance, p.xOffset, p.yOffset);
    words.set(text, { ids: run.glyphs.map((g) => g.id), codePoints: run.glyphs.map((g) => [...g.codePoints]), positions, advanceWidth: run.advanceWidth, age: 0 });
  }
  // The earlier build's words this one did not use, a build older.
  let aged = 0;
  const stored = storedFor.get(data)?.words;
  if (stored instanceof Map) {
    for (const [text, run] of stored) {
      if (words.has(text)) continue;
      const age = (typeof run.age === 'number' ? run.age : 0) + 1;
      aged++;
      if (age <= MAX_AGE) words.set(text, { ...run, age });
    }
  }
  return { words, pairs: new Map(shaped.pairs), plain: [...shaped.plain], fresh: shaped.fresh + aged + shaped.pairs.size - shaped.storedPairs };
}

const isNudge = (n: unknown): n is Nudge | null =>
  n === null || (typeof n === 'object' && ['xAdvance', 'yAdvance', 'xOffset', 'yOffset'].every((k) => typeof (n as Record<string, unknown>)[k] === 'number'));

/** An earlier build's pairs, those that are what pair-runs.ts makes (by key, a nudge or null). */
function storedPairs(stored: StoredLayouts | undefined): Map<number, Nudge | null> {
  const pairs = new Map<number, Nudge | null>();
  if (stored?.pairs instanceof Map) for (const [k, n] of stored.pairs) if (typeof k === 'number' && isNudge(n)) pairs.set(k, n);
  return pairs;
}

const isCount = (n: unknown, below: number) => typeof n === 'number' && Number.isInteger(n) && n >= 0 && n < below;

/** A kept layout as fontkit's run (its glyph objects from the font), or undefined if it is not one this font can have made. */
function runOf(font: FontkitFont, stored: StoredRun): Run | undefined {
  const { ids, codePoints, positions, advanceWidth } = stored;
  if (!Array.isArray(ids) || !Array.isArray(codePoints) || !Array.isArray(positions) || typeof advanceWidth !== 'number') return undefined;
  if (codePoints.length !== ids.length || positions.length !== 4 * ids.length) return undefined;
  if (!ids.every((id) => isCount(id, font.numGlyphs)) || !positions.every((v) => typeof v === 'number')) return undefined;
  if (!codePoints.every((c) => Array.isArray(c) && c.every((cp) => isCount(cp, 0x110000)))) return undefined;
  const glyphs = ids.map((id, i) => font.getGlyph(id, [...codePoints[i]!]));
  const at = Array.from({ length: ids.length }, (_, i) => ({ xAdvance: positions[4 * i]!, yAdvance: positions[4 * i + 1]!, xOffset: positions[4 * i + 2]!, yOffset: positions[4 * i + 3]! }));
  return { glyphs, positions: at, advanceWidth } as unknown as Run;
}

function rememberLayouts(font: FontkitFont, data?: object): FontkitFont {
  const shape = font.layout.bind(font) as (text: string, ...rest: unknown[]) => Run;
  // Figures, most of the words and nearly all seen once, are laid out from their pairs (pair-runs.ts).
  const stored = data ? storedFor.get(data) : undefined;
  const pairs = storedPairs(stored);
  const storedPlain = Array.isArray(stored?.plain) && stored.plain.every((c) => isCount(c, 0x10000)) ? new Set(stored.plain) : undefined;
  const plain = storedPlain ?? plainCharacters(font);
  const figure = pairRuns(font, shape, pairs, plain);
  let known = new Map<string, Run>();
  // Words shaped whole, for the next build (wordsShaped): not figures, which their pairs lay out faster than they are read.
  const shaped = { runs: new Map<string, Run>(), fresh: storedPlain ? 0 : 1, pairs, storedPairs: pairs.size, plain };
  if (data) shapedFor.set(data, shaped);
  const word = (text: string): Run => {
    let run = known.get(text);
    if (run === undefined) {
      if (known.size >= MAX_LAYOUTS) known = new Map();
      run = figure(text);
      if (run === undefined) {
        const kept = stored?.words instanceof Map ? stored.words.get(text) : undefined;
        run = kept ? runOf(font, kept) : undefined;
        if (run === undefined) {
          run = shape(text);
          shaped.fresh++;
        }
        if (shaped.runs.size < MAX_LAYOUTS) shaped.runs.set(text, run);
      }
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
  if (!font) opened.set(data, (font = rememberLayouts(raw.create(...args), data)));
  return font;
}

export const fontkit: FontkitModule = { ...raw, create: create as FontkitModule['create'] };
