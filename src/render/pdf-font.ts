/**
 * A TrueType font embedded whole-numbered: the text of every page is the
 * font's own glyph numbers (Identity-H, CID = glyph number; ISO 32000-1
 * §9.7.4), so pages laid out apart, or kept from an earlier build, join any
 * document. The font program keeps only the tables a PDF reader uses for a
 * CIDFontType2 (§9.9: head, hhea, loca, maxp, cvt, prep, glyf, hmtx, fpgm;
 * and OS/2 and name, which are small): shaping tables (GPOS alone is 115 KB
 * of Plex Sans's 218 KB) were for layout, which is done. Widths cover every
 * glyph; the ToUnicode map (§9.10.3) gives each glyph its text, from the
 * font's cmap and, for glyphs that shaping made (a ligature, a form chosen
 * before a combining mark), from the text they were shaped from.
 */
import { deflateSync } from 'node:zlib';
import { type PdfFile, array, asciiString, dict, name, num, ref } from '../pack/pdf-file.ts';
import type { FontkitFont } from './fontkit.ts';

const KEEP = new Set(['head', 'hhea', 'loca', 'maxp', 'cvt ', 'prep', 'glyf', 'hmtx', 'fpgm', 'OS/2', 'name']);

const sum32 = (b: Uint8Array) => {
  let s = 0;
  const v = new DataView(b.buffer, b.byteOffset, b.byteLength);
  for (let i = 0; i + 3 < b.length; i += 4) s = (s + v.getUint32(i)) >>> 0;
  return s;
};

/** The font file with only the tables in KEEP, checksums written afresh (the OpenType table directory). */
export function pdfFontProgram(font: Uint8Array): Uint8Array {
  const view = new DataView(font.buffer, font.byteOffset, font.byteLength);
  const count = view.getUint16(4);
  const tables: { tag: string; data: Uint8Array }[] = [];
  for (let i = 0; i < count; i++) {
    const at = 12 + 16 * i;
    const tag = String.fromCharCode(font[at]!, font[at + 1]!, font[at + 2]!, font[at + 3]!);
    const offset = view.getUint32(at + 8);
    const length = view.getUint32(at + 12);
    if (KEEP.has(tag)) tables.push({ tag, data: font.slice(offset, offset + length) });
  }
  tables.sort((a, b) => (a.tag < b.tag ? -1 : 1));
  const n = tables.length;
  const pow = 2 ** Math.floor(Math.log2(n));
  let size = 12 + 16 * n;
  for (const t of tables) size += (t.data.length + 3) & ~3;
  const out = new Uint8Array(size);
  const w = new DataView(out.buffer);
  w.setUint32(0, view.getUint32(0));
  w.setUint16(4, n);
  w.setUint16(6, pow * 16);
  w.setUint16(8, Math.log2(pow));
  w.setUint16(10, n * 16 - pow * 16);
  let offset = 12 + 16 * n;
  let headAt = -1;
  tables.forEach((t, i) => {
    if (t.tag === 'head') {
      headAt = offset;
      // checkSumAdjustment is summed as zero, and set once the whole file is known.
      t.data.fill(0, 8, 12);
    }
    const padded = new Uint8Array((t.data.length + 3) & ~3);
    padded.set(t.data);
    const at = 12 + 16 * i;
    for (let k = 0; k < 4; k++) out[at + k] = t.tag.charCodeAt(k);
    w.setUint32(at + 4, sum32(padded));
    w.setUint32(at + 8, offset);
    w.setUint32(at + 12, t.data.length);
    out.set(padded, offset);
    offset += padded.length;
  });
  if (headAt >= 0) w.setUint32(headAt + 8, (0xb1b0afba - sum32(out)) >>> 0);
  return out;
}

/* fontkit's parsed hmtx table, as far as it is read here (a restructure LazyArray; no types ship for it). */
interface Hmtx {
  readonly metrics: { readonly length: number; get(i: number): { readonly advance: number } | undefined };
}

/**
 * Each glyph's advance width, as fontkit's `glyph.advanceWidth` gives it,
 * read from the hmtx table (OpenType's "hmtx": glyphs past the last long
 * metric take its advance). fontkit's getter computes every glyph's
 * control box first, for vertical metrics the widths never use: 50–60 ms
 * of each build for the 1,600 glyphs of two faces. A font with variations
 * (HVAR) is left to fontkit.
 */
export function advanceWidths(font: FontkitFont): (id: number) => number {
  const table = font as unknown as { readonly hmtx?: Hmtx; readonly HVAR?: unknown; readonly _variationProcessor?: unknown };
  const metrics = table.hmtx?.metrics;
  if (!metrics || metrics.length === 0 || (table._variationProcessor && table.HVAR)) return (id) => font.getGlyph(id).advanceWidth;
  const last = metrics.get(metrics.length - 1)?.advance ?? 0;
  return (id) => (id < metrics.length ? metrics.get(id)!.advance : last);
}

const hex4 = (n: number) => n.toString(16).padStart(4, '0').toUpperCase();
const utf16Hex = (text: string) => {
  let s = '';
  for (let i = 0; i < text.length; i++) s += hex4(text.charCodeAt(i));
  return s;
};

/** Each glyph the font's cmap reaches, with the lowest code point that reaches it. */
const mappedText = new WeakMap<FontkitFont, Map<number, string>>();
export function cmapText(font: FontkitFont): ReadonlyMap<number, string> {
  let m = mappedText.get(font);
  if (!m) {
    m = new Map();
    for (const cp of [...font.characterSet].sort((a, b) => a - b)) {
      const id = font.glyphForCodePoint(cp).id;
      // Glyph 0 is .notdef: the cmap sends code points the font lacks there (U+FFFF among them).
      if (id !== 0 && !m.has(id)) m.set(id, String.fromCodePoint(cp));
    }
    mappedText.set(font, m);
  }
  return m;
}

/**
 * Writes `bytes` (the file `font` was read from) into `file` as the Type0
 * font object `n`; `shaped` gives the text of glyphs shaping made.
 */
/**
 * What a font's objects in pack.pdf take from the font file alone, the
 * same in every document: the font program as stored (deflated) with its
 * length before, the name, the descriptor's entries (its FontFile2 apart),
 * the widths array and the text of each glyph the cmap reaches. Reading
 * them took 60 ms of every build (fontkit's tables, deflating 200 KB), so
 * a later build of the same font file takes them from the build cache.
 */
export interface FontParts {
  readonly program: Uint8Array;
  readonly length1: number;
  readonly fontName: string;
  readonly descriptor: Readonly<Record<string, string>>;
  readonly widths: string;
  readonly cmap: ReadonlyMap<number, string>;
}

/** Parts by font file (the bytes object): made here, or kept by an earlier build (rememberFontParts). */
const partsFor = new WeakMap<object, FontParts>();

const isFontParts = (p: unknown): p is FontParts => {
  const v = p as Partial<FontParts> | null;
  return (
    typeof v === 'object' && v !== null && v.program instanceof Uint8Array && typeof v.length1 === 'number' && typeof v.fontName === 'string' &&
    typeof v.descriptor === 'object' && v.descriptor !== null && Object.values(v.descriptor).every((x) => typeof x === 'string') &&
    typeof v.widths === 'string' && v.cmap instanceof Map
  );
};

/** Parts an earlier build made from the font file `bytes` (the same bytes: the caller checks); anything else is ignored. */
export function rememberFontParts(bytes: Uint8Array, parts: unknown): void {
  if (isFontParts(parts) && !partsFor.has(bytes)) partsFor.set(bytes, parts);
}

/** The parts of the font file `bytes` made or taken in this process, if any, for a later build. */
export const fontPartsOf = (bytes: Uint8Array): FontParts | undefined => partsFor.get(bytes);

function fontParts(bytes: Uint8Array, font: FontkitFont): FontParts {
  let parts = partsFor.get(bytes);
  if (!parts) {
    const scale = 1000 / font.unitsPerEm;
    const program = pdfFontProgram(bytes);
    const { minX, minY, maxX, maxY } = font.bbox;
    const advances = advanceWidths(font);
    parts = {
      program: new Uint8Array(deflateSync(program)),
      length1: program.length,
      fontName: name(font.postscriptName || 'Font'),
      descriptor: {
        // Nonsymbolic (bit 6): the glyphs are Latin text (§9.8.2).
        Flags: '32',
        FontBBox: array([minX * scale, minY * scale, maxX * scale, maxY * scale].map(num)),
        ItalicAngle: num(font.italicAngle),
        Ascent: num(font.ascent * scale),
        Descent: num(font.descent * scale),
        CapHeight: num((font.capHeight || font.ascent) * scale),
        XHeight: num((font.xHeight || 0) * scale),
        StemV: '0',
      },
      widths: array(['0', array(Array.from({ length: font.numGlyphs }, (_, id) => num(Math.round(advances(id) * scale * 1000) / 1000)))]),
      cmap: cmapText(font),
    };
    partsFor.set(bytes, parts);
  }
  return parts;
}

export function writeWholeFont(file: PdfFile, bytes: Uint8Array, font: FontkitFont, shaped: ReadonlyMap<number, string>, n: number): void {
  const parts = fontParts(bytes, font);
  const fontName = parts.fontName;
  const programFile = file.stream({ Filter: '/FlateDecode', Length1: String(parts.length1) }, parts.program);
  const descriptor = file.add(dict({ Type: '/FontDescriptor', FontName: fontName, ...parts.descriptor, FontFile2: ref(programFile) }));
  const cid = file.add(
    dict({
      Type: '/Font',
      Subtype: '/CIDFontType2',
      BaseFont: fontName,
      CIDSystemInfo: dict({ Registry: asciiString('Adobe'), Ordering: asciiString('Identity'), Supplement: '0' }),
      FontDescriptor: ref(descriptor),
      W: parts.widths,
      CIDToGIDMap: '/Identity',
    }),
  );
  const text = new Map(parts.cmap);
  // What a glyph was shaped from wins over the cmap's code point: "fi" is searchable, "ﬁ" is not.
  for (const [id, t] of shaped) text.set(id, t);
  const entries = [...text].sort(([a], [b]) => a - b);
  const blocks: string[] = [];
  // At most 100 mappings to a beginbfchar block (Adobe technical note 5411).
  for (let i = 0; i < entries.length; i += 100) {
    const chunk = entries.slice(i, i + 100);
    blocks.push(`${chunk.length} beginbfchar\n${chunk.map(([id, t]) => `<${hex4(id)}> <${utf16Hex(t)}>`).join('\n')}\nendbfchar`);
  }
  const cmap = [
    '/CIDInit /ProcSet findresource begin',
    '12 dict begin',
    'begincmap',
    '/CIDSystemInfo << /Registry (Adobe) /Ordering (UCS) /Supplement 0 >> def',
    '/CMapName /Adobe-Identity-UCS def',
    '/CMapType 2 def',
    '1 begincodespacerange',
    '<0000> <FFFF>',
    'endcodespacerange',
    ...blocks,
    'endcmap',
    'CMapName currentdict /CMap defineresource pop',
    'end',
    'end',
  ].join('\n');
  const toUnicode = file.stream({ Filter: '/FlateDecode' }, deflateSync(cmap));
  file.put(n, dict({ Type: '/Font', Subtype: '/Type0', BaseFont: fontName, Encoding: '/Identity-H', DescendantFonts: array([ref(cid)]), ToUnicode: ref(toUnicode) }));
}
