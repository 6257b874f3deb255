/**
 * fontkit's layout of a number, a date or a figure, without shaping it.
 *
 * Most of the words a pack shapes are figures ("49.872", "2026-11-30",
 * "±0.12"), nearly all of them seen once, and fontkit takes 40–100 µs to
 * shape each: 0.4 s on each thread of a 100-characteristic build.
 * For these words shaping does little that can be known in advance: no
 * substitution touches their glyphs and no mark or cursive positioning
 * either, so what fontkit gives is each glyph's advance, plus whatever
 * kerning the font's pair adjustments add between neighbours. A pair
 * adjustment looks at a glyph and the next one only, and fontkit moves on
 * by one glyph after each (`applyLookups`), so a word's layout is its
 * glyphs' advances plus, at each glyph, what fontkit's own layout of that
 * glyph with the next one adds. Those pairs are shaped by fontkit, once.
 *
 * That holds under conditions read from the font's tables when it is
 * opened (fontkit 1.1's default shaper, read from its source):
 * - the word's characters are of the Common script (digits, punctuation,
 *   symbols), so fontkit picks the same script, and with it the same
 *   lookups, for the word and for each of its pairs;
 * - no lookup of a feature that shaper applies to such text (`ccmp`,
 *   `locl`, `rlig`, `calt`, `clig`, `liga`, `rclt`, `rvrn`, `ltra`, `ltrm`
 *   in GSUB; `mark`, `mkmk`, `curs` in GPOS) can start at one of their
 *   glyphs; `frac`, `numr` and `dnom` apply only beside U+2044, which is
 *   not among them;
 * - the `kern` lookups are pair adjustments that move the first glyph
 *   only (an empty second value format), and none of the glyphs is a mark,
 *   which those lookups would skip;
 * - the font has no `morx` or `kern` table (fontkit would use them instead).
 * Where any of this fails the font gets no shortcut, and a word with any
 * other character is shaped as before. test/render/pair-runs.test.ts
 * compares the shortcut with fontkit's own layout.
 */
import type { FontkitFont } from './fontkit.ts';

type Run = ReturnType<FontkitFont['layout']>;
type Glyph = Run['glyphs'][number];
type Position = Run['positions'][number];

/**
 * Characters that are candidates: ASCII's non-letters and a few common
 * symbols, every one of them of the Common script in every Unicode version
 * (so fontkit's script detection, whatever its data, finds no script in
 * them). U+00AD (soft hyphen), which fontkit hides, is not among them.
 */
const CANDIDATES: readonly number[] = [
  ...Array.from({ length: 0x7f - 0x20 }, (_, i) => 0x20 + i).filter((c) => !((c >= 0x41 && c <= 0x5a) || (c >= 0x61 && c <= 0x7a))),
  0xa0, 0xb0, 0xb1, 0xb7, 0xd7, 0xf7, 0x2013, 0x2014, 0x2026, 0x2192, 0x2212, 0x2264, 0x2265,
];

const GSUB_APPLIED = new Set(['rvrn', 'ltra', 'ltrm', 'ccmp', 'locl', 'rlig', 'calt', 'clig', 'liga', 'rclt']);
const GPOS_APPLIED = new Set(['mark', 'mkmk', 'curs', 'kern']);
const PAIR_ADJUSTMENT = 2;
const EXTENSION = { GSUB: 7, GPOS: 9 } as const;
const MARK_CLASS = 3;

/* fontkit's parsed tables, as far as they are read here (restructure objects; no types ship for them). */
interface Coverage {
  readonly version: number;
  readonly glyphs?: readonly number[];
  readonly rangeRecords?: readonly { readonly start: number; readonly end: number }[];
}
interface ClassDef {
  readonly version: number;
  readonly startGlyph?: number;
  readonly classValueArray?: readonly number[];
  readonly classRangeRecord?: readonly { readonly start: number; readonly end: number; readonly class: number }[];
}
interface Subtable {
  readonly lookupType?: number;
  readonly extension?: Subtable;
  readonly coverage?: Coverage;
  readonly coverages?: readonly Coverage[];
  readonly inputCoverage?: readonly Coverage[];
  readonly markCoverage?: Coverage;
  readonly mark1Coverage?: Coverage;
  readonly valueFormat2?: Readonly<Record<string, boolean>>;
}
interface Lookup {
  readonly lookupType: number;
  readonly subTables: readonly Subtable[];
}
interface LayoutTable {
  readonly featureList: readonly { readonly tag: string; readonly feature: { readonly lookupListIndexes: readonly number[] } }[];
  readonly lookupList: { get(i: number): Lookup };
}
interface Tables {
  readonly GSUB?: LayoutTable;
  readonly GPOS?: LayoutTable;
  readonly GDEF?: { readonly glyphClassDef?: ClassDef };
  readonly morx?: unknown;
  readonly kern?: unknown;
}

function coverageHas(c: Coverage, glyph: number): boolean {
  if (c.glyphs) return c.glyphs.includes(glyph);
  if (c.rangeRecords) return c.rangeRecords.some((r) => glyph >= r.start && glyph <= r.end);
  // A coverage format this code does not know: assume it covers the glyph.
  return true;
}

function classOf(def: ClassDef, glyph: number): number {
  if (def.classValueArray && def.startGlyph !== undefined) return def.classValueArray[glyph - def.startGlyph] ?? 0;
  if (def.classRangeRecord) return def.classRangeRecord.find((r) => glyph >= r.start && glyph <= r.end)?.class ?? 0;
  return MARK_CLASS;
}

/** Where a subtable can start: its first coverage (every GSUB and GPOS subtable has one), or undefined for a shape not known here. */
const firstCoverage = (s: Subtable): Coverage | undefined => s.coverage ?? s.inputCoverage?.[0] ?? s.coverages?.[0] ?? s.markCoverage ?? s.mark1Coverage;

/** The lookups of `table` in features whose tag is in `tags`, with each subtable unwrapped from its extension; undefined if one cannot be read. */
function lookupsOf(table: LayoutTable | undefined, tags: ReadonlySet<string>, extension: number): { type: number; subtable: Subtable }[] | undefined {
  if (!table) return [];
  const indexes = new Set(table.featureList.filter((f) => tags.has(f.tag)).flatMap((f) => f.feature.lookupListIndexes));
  const out: { type: number; subtable: Subtable }[] = [];
  for (const i of indexes) {
    const lookup = table.lookupList.get(i);
    for (const st of lookup.subTables) {
      const unwrapped = lookup.lookupType === extension ? st.extension : st;
      const type = lookup.lookupType === extension ? st.lookupType : lookup.lookupType;
      if (!unwrapped || type === undefined) return undefined;
      out.push({ type, subtable: unwrapped });
    }
  }
  return out;
}

/** The candidate characters whose glyph no applied lookup can start at and that are not marks; empty where the conditions above fail. */
export function plainCharacters(font: FontkitFont): ReadonlySet<number> {
  const t = font as unknown as Tables;
  const none = new Set<number>();
  const gdef = t.GDEF?.glyphClassDef;
  if (t.morx || t.kern || !t.GPOS || !gdef) return none;
  const gsub = lookupsOf(t.GSUB, GSUB_APPLIED, EXTENSION.GSUB);
  const gpos = lookupsOf(t.GPOS, GPOS_APPLIED, EXTENSION.GPOS);
  if (!gsub || !gpos) return none;
  const pairs = gpos.filter((l) => l.type === PAIR_ADJUSTMENT);
  // A pair adjustment that moves the second glyph as well: a word is no longer its pairs.
  if (pairs.some((l) => !l.subtable.valueFormat2 || Object.values(l.subtable.valueFormat2).some(Boolean))) return none;
  const starts: Coverage[] = [];
  for (const l of [...gsub, ...gpos.filter((x) => x.type !== PAIR_ADJUSTMENT)]) {
    const c = firstCoverage(l.subtable);
    if (!c) return none;
    starts.push(c);
  }
  const plain = new Set<number>();
  for (const cp of CANDIDATES) {
    const id = font.glyphForCodePoint(cp).id;
    if (id === 0 || classOf(gdef, id) === MARK_CLASS || starts.some((c) => coverageHas(c, id))) continue;
    plain.add(cp);
  }
  return plain;
}

/** What fontkit's layout of a pair adds to its first glyph's position; null where the pair does not lay out as two plain glyphs. */
export interface Nudge {
  readonly xAdvance: number;
  readonly yAdvance: number;
  readonly xOffset: number;
  readonly yOffset: number;
}

/** A pair's key in the map of pairs: the first character's code unit times 65,536 plus the second's. */
export const pairKey = (a: number, b: number) => a * 0x10000 + b;

/**
 * The layout of a word of plain characters, from its glyphs and its
 * pairs' layouts (`shape` is fontkit's own layout); undefined for any
 * other word, which the caller shapes. `nudges`, where given, is the map
 * of pairs (by pairKey) read and filled here: one an earlier build laid
 * out with the same font comes in filled; `plain`, where given, is
 * plainCharacters of the same font, as an earlier build found them.
 */
export function pairRuns(
  font: FontkitFont,
  shape: (text: string) => Run,
  nudges = new Map<number, Nudge | null>(),
  plain: ReadonlySet<number> = plainCharacters(font),
): (text: string) => Run | undefined {
  if (plain.size === 0) return () => undefined;
  const glyphOf = new Map<number, Glyph>();
  for (const cp of plain) glyphOf.set(cp, font.glyphForCodePoint(cp));
  const nudge = (a: number, b: number): Nudge | null => {
    const key = pairKey(a, b);
    let n = nudges.get(key);
    if (n === undefined) {
      const run = shape(String.fromCharCode(a, b));
      const [ga, gb] = [glyphOf.get(a)!, glyphOf.get(b)!];
      const [pa, pb] = run.positions as readonly Position[];
      // As the conditions say it must be: the two glyphs unchanged, the second where its advance puts it.
      const asExpected =
        run.glyphs.length === 2 && run.glyphs[0]!.id === ga.id && run.glyphs[1]!.id === gb.id &&
        pb!.xAdvance === gb.advanceWidth && pb!.yAdvance === 0 && pb!.xOffset === 0 && pb!.yOffset === 0;
      n = asExpected ? { xAdvance: pa!.xAdvance - ga.advanceWidth, yAdvance: pa!.yAdvance, xOffset: pa!.xOffset, yOffset: pa!.yOffset } : null;
      nudges.set(key, n);
    }
    return n;
  };
  return (text) => {
    const n = text.length;
    if (n === 0) return undefined;
    for (let i = 0; i < n; i++) if (!plain.has(text.charCodeAt(i))) return undefined;
    const glyphs: Glyph[] = [];
    const positions: Position[] = [];
    let advanceWidth = 0;
    for (let i = 0; i < n; i++) {
      const a = text.charCodeAt(i);
      const g = glyphOf.get(a)!;
      const k = i + 1 < n ? nudge(a, text.charCodeAt(i + 1)) : { xAdvance: 0, yAdvance: 0, xOffset: 0, yOffset: 0 };
      if (k === null) return undefined;
      const xAdvance = g.advanceWidth + k.xAdvance;
      glyphs.push(g);
      positions.push({ xAdvance, yAdvance: k.yAdvance, xOffset: k.xOffset, yOffset: k.yOffset } as Position);
      advanceWidth += xAdvance;
    }
    return { glyphs, positions, advanceWidth } as unknown as Run;
  };
}
