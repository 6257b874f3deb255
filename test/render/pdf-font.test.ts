/**
 * The widths pack.pdf gives each glyph (its CIDFont's W array) are read
 * from the hmtx table without fontkit's glyph objects: they must be what
 * @pdf-lib/fontkit's own `glyph.advanceWidth` gives (the registry library,
 * opened here without plumbline's wrapper), for every glyph of both faces.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import type { FontkitFont, FontkitModule } from '../../src/render/fontkit.ts';
import { loadFonts } from '../../src/render/fonts.ts';
import { deserialize, serialize } from 'node:v8';
import { PdfFile } from '../../src/pack/pdf-file.ts';
import { advanceWidths, fontPartsOf, rememberFontParts, writeWholeFont } from '../../src/render/pdf-font.ts';

const reference = createRequire(import.meta.url)('@pdf-lib/fontkit') as FontkitModule;
const files = loadFonts();

describe('advance widths from the hmtx table', () => {
  for (const face of ['regular', 'semibold'] as const) {
    it(`equal fontkit's glyph.advanceWidth for every glyph of Plex Sans ${face}`, () => {
      const font = reference.create(files[face]);
      const mine = advanceWidths(reference.create(files[face]));
      expect(font.numGlyphs).toBeGreaterThan(500);
      const got = Array.from({ length: font.numGlyphs }, (_, id) => mine(id));
      const want = Array.from({ length: font.numGlyphs }, (_, id) => font.getGlyph(id).advanceWidth);
      expect(got).toEqual(want);
    });
  }
  it('give glyphs past the last long metric its advance (OpenType spec, "hmtx": the last advance width applies to all later glyphs)', () => {
    const advances = [500, 600, 700];
    const table = { hmtx: { metrics: { length: 3, get: (i: number) => ({ advance: advances[i]! }) } }, getGlyph: () => { throw new Error('not read'); } };
    const width = advanceWidths(table as unknown as FontkitFont);
    expect([0, 1, 2, 3, 40].map(width)).toEqual([500, 600, 700, 700, 700]);
  });
});

describe('a font\'s parts kept between builds', () => {
  /** A document holding the font alone (object 1), as writeWholeFont writes it from `bytes`. */
  const documentOf = (bytes: Uint8Array) => {
    const file = new PdfFile();
    const n = file.reserve();
    writeWholeFont(file, bytes, reference.create(bytes), new Map([[1, 'fi']]), n);
    return Buffer.from(file.finish(n, n));
  };
  it('write the same bytes as parts made from the font file, and are not taken when malformed', () => {
    const first = new Uint8Array(files.regular);
    const made = documentOf(first);
    const parts = fontPartsOf(first);
    expect(parts?.program.length).toBeGreaterThan(10_000);
    // Through the cache's encoding, as the next build reads them.
    const second = new Uint8Array(files.regular);
    rememberFontParts(second, deserialize(serialize(parts)));
    expect(fontPartsOf(second)).not.toBe(parts);
    expect(documentOf(second).equals(made)).toBe(true);
    // Parts that are not such (no program) are ignored: the font file is read again.
    const third = new Uint8Array(files.regular);
    rememberFontParts(third, { ...parts, program: 'not bytes' });
    expect(fontPartsOf(third)).toBeUndefined();
    expect(documentOf(third).equals(made)).toBe(true);
  });
});
