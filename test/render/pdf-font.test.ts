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
import { advanceWidths } from '../../src/render/pdf-font.ts';

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
