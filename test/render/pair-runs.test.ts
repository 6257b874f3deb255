/**
 * Figures laid out from their pairs (src/render/pair-runs.ts) must be what
 * fontkit's own layout gives for the same text: the reference here is
 * @pdf-lib/fontkit itself (the registry library that shapes every other
 * word), opened without plumbline's wrapper, on the fonts the pack uses.
 * Compared: the glyph objects, each position's four fields and the run's
 * advance width, on seeded words of the characters the shortcut accepts
 * (spaces and the font's kerning pairs among them), on words it must leave
 * to fontkit, and through the word memo every renderer shapes with. The
 * conditions read from the font's tables are checked on altered tables.
 */
import { createRequire } from 'node:module';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type FontkitFont, type FontkitModule, fontkit } from '../../src/render/fontkit.ts';
import { loadFonts } from '../../src/render/fonts.ts';
import { pairRuns, plainCharacters } from '../../src/render/pair-runs.ts';

// fontkit straight from the registry package, not through src/render/fontkit.ts.
const reference = createRequire(import.meta.url)('@pdf-lib/fontkit') as FontkitModule;
const files = loadFonts();
const faces = { regular: files.regular, semibold: files.semibold };

type Run = ReturnType<FontkitFont['layout']>;

/** What a caller can read of a run: glyphs (the same objects, when both runs come from one font object), positions, advance width. */
function expectSameRun(got: Run, want: Run, text: string, sameFont = true) {
  expect(got.glyphs.length, text).toBe(want.glyphs.length);
  got.glyphs.forEach((g, i) => {
    const w = want.glyphs[i]!;
    if (sameFont) expect(g, `${text}: glyph ${i}`).toBe(w);
    else expect([g.id, g.codePoints, g.advanceWidth], `${text}: glyph ${i}`).toEqual([w.id, w.codePoints, w.advanceWidth]);
  });
  got.positions.forEach((p, i) => {
    const w = want.positions[i]!;
    expect([p.xAdvance, p.yAdvance, p.xOffset, p.yOffset], `${text}: position ${i}`).toEqual([w.xAdvance, w.yAdvance, w.xOffset, w.yOffset]);
  });
  expect(got.advanceWidth, text).toBe(want.advanceWidth);
}

describe.each(Object.entries(faces))('figures from pairs, IBM Plex Sans %s', (_name, bytes) => {
  const font = reference.create(bytes);
  const shape = font.layout.bind(font) as (text: string) => Run;
  const figure = pairRuns(font, shape);
  const plain = [...plainCharacters(font)].map((c) => String.fromCharCode(c));

  it('takes figures: digits, the decimal point, signs and the separators of dates', () => {
    // What the shortcut is for; were the font's tables read wrongly, it would reach nothing.
    for (const c of '0123456789.,-+±−–:%() ') expect(plain, c).toContain(c);
    for (const c of 'AaTfiV') expect(plain, c).not.toContain(c);
  });

  it('gives fontkit’s layout for seeded words of those characters', () => {
    const word = fc.array(fc.constantFrom(...plain), { minLength: 1, maxLength: 16 }).map((cs) => cs.join(''));
    fc.assert(
      fc.property(word, (text) => {
        const got = figure(text);
        expect(got, text).toBeDefined();
        expectSameRun(got!, shape(text), text);
      }),
      { numRuns: 3000, seed: 20261202 },
    );
  });

  it('keeps the font’s kerning between neighbours', () => {
    // Pairs that IBM Plex Sans kerns (read from fontkit's layout of each pair: ".\"" -90, "//" -120 units).
    for (const text of ['"12.5".', '1//2', '3?.', '50%"', '…"', "'9',"]) {
      const want = shape(text);
      expect(want.advanceWidth, `${text} is kerned`).not.toBe(want.glyphs.reduce((s, g) => s + g.advanceWidth, 0));
      expectSameRun(figure(text)!, want, text);
    }
  });

  it('leaves every other word to fontkit', () => {
    for (const text of ['', 'fi', 'T.', 'x1', '2026-11-30T', 'Δ5', '1\u00ad2', '½', '1\u20442']) expect(figure(text), JSON.stringify(text)).toBeUndefined();
  });

  it('is what the word memo gives every renderer, figures and words alike', () => {
    const memo = fontkit.create(new Uint8Array(bytes));
    const direct = reference.create(new Uint8Array(bytes));
    // Spaces among figures: no pair with a space is kerned among them, so joining words at spaces loses nothing.
    for (const text of ['49.87277', '2026-11-30', '±0.12', '(3)', '"7".', 'UCL', 'Individuals', '1 234', '53.24 – 46.50']) {
      expectSameRun(memo.layout(text), direct.layout(text), text, false);
    }
  });
});

describe('the conditions read from the font', () => {
  const font = reference.create(files.regular);
  const gpos = (font as unknown as { GPOS: object }).GPOS;
  /** The font with some of its tables replaced. */
  const altered = (tables: Record<string, unknown>) =>
    Object.defineProperties(Object.create(font) as FontkitFont, Object.fromEntries(Object.entries(tables).map(([k, value]) => [k, { value }])));
  const kernOnly = (valueFormat2: Record<string, boolean>, glyphs: number[] = []) => ({
    featureList: [{ tag: 'kern', feature: { lookupListIndexes: [0] } }],
    lookupList: { get: () => ({ lookupType: 2, subTables: [{ coverage: { version: 1, glyphs }, valueFormat2 }] }) },
  });

  it('holds for the real tables', () => {
    expect(plainCharacters(font).size).toBeGreaterThan(0);
    expect(gpos).toBeDefined();
  });

  it('fails for a font with a kern or morx table, or without GPOS or glyph classes', () => {
    expect(plainCharacters(altered({ kern: {} })).size).toBe(0);
    expect(plainCharacters(altered({ morx: {} })).size).toBe(0);
    expect(plainCharacters(altered({ GPOS: undefined })).size).toBe(0);
    expect(plainCharacters(altered({ GDEF: undefined })).size).toBe(0);
  });

  it('fails where a pair adjustment moves the second glyph too', () => {
    expect(plainCharacters(altered({ GSUB: undefined, GPOS: kernOnly({ xAdvance: false, xPlacement: false }) })).size).toBeGreaterThan(0);
    expect(plainCharacters(altered({ GSUB: undefined, GPOS: kernOnly({ xAdvance: true, xPlacement: false }) })).size).toBe(0);
  });

  it('drops a character whose glyph is a mark (kerning skips marks)', () => {
    const one = font.glyphForCodePoint(0x31).id;
    const gdef = { glyphClassDef: { version: 2, classRangeRecord: [{ start: one, end: one, class: 3 }] } };
    const plain = plainCharacters(altered({ GDEF: gdef }));
    expect(plain.has(0x31)).toBe(false);
    expect(plain.has(0x32)).toBe(true);
  });

  it('drops a character whose glyph a substitution can start at', () => {
    const one = font.glyphForCodePoint(0x31).id;
    const liga = {
      featureList: [{ tag: 'liga', feature: { lookupListIndexes: [0] } }],
      lookupList: { get: () => ({ lookupType: 4, subTables: [{ coverage: { version: 1, glyphs: [one] } }] }) },
    };
    const plain = plainCharacters(altered({ GSUB: liga, GPOS: kernOnly({}) }));
    expect(plain.has(0x31)).toBe(false);
    expect(plain.has(0x32)).toBe(true);
    // A feature fontkit does not apply by default (old-style figures) changes nothing.
    const onum = { ...liga, featureList: [{ tag: 'onum', feature: { lookupListIndexes: [0] } }] };
    expect(plainCharacters(altered({ GSUB: onum, GPOS: kernOnly({}) })).has(0x31)).toBe(true);
  });
});
