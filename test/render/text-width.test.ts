/**
 * textWidth walks a line's words (pdf-ink.ts, `wordsWidth`) instead of
 * asking for the joined run: it must give the very number the joined run
 * gives, the glyph advances of fontkit's layout summed in order (the
 * reference: @pdf-lib/fontkit's own glyphs, through `shape`).
 */
import { describe, expect, it } from 'vitest';
import { fontkit } from '../../src/render/fontkit.ts';
import { loadFonts } from '../../src/render/fonts.ts';
import { shape, textWidth } from '../../src/render/pdf-ink.ts';

const files = loadFonts();

/** The joined run's width, as textWidth computed it before: every glyph of the layout, in order. */
function joinedWidth(font: ReturnType<typeof fontkit.create>, text: string, size: number): number {
  const glyphs = shape(font, text).run.glyphs;
  const scale = 1000 / font.unitsPerEm;
  let total = 0;
  for (const g of glyphs) total += g.advanceWidth * scale;
  return total * (size / 1000);
}

describe('textWidth', () => {
  for (const [face, bytes] of [['regular', files.regular], ['semibold', files.semibold]] as const) {
    it(`gives the joined run's width exactly (${face})`, () => {
      const font = fontkit.create(bytes);
      // Seeded (mulberry32) lines of words from a mixed alphabet: letters, figures, ligature pairs
      // (fi, fl), punctuation, runs of spaces and ends with spaces, and a letter the font lacks
      // precomposed (ḡ), which takes shape's other layout.
      let seed = 7;
      const random = () => {
        seed = (seed + 0x6d2b79f5) | 0;
        let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
        t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
        return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
      };
      const pieces = ['Page', 'of', '12', '2194', 'fi', 'fl', 'Cpk', '1.33', '–', '—', 'σz', 'AV', 'To', '(', ')', ',', 'ḡ', 'x̄', '', ' '];
      const lines = ['', ' ', '  ', 'Page 12 of 2194', ' lead', 'trail ', 'a  b'];
      for (let n = 0; n < 3000; n++) {
        const words = Array.from({ length: 1 + Math.floor(random() * 6) }, () => pieces[Math.floor(random() * pieces.length)]!);
        lines.push(words.join(' '));
      }
      for (const line of lines) for (const size of [8, 10.5]) expect(textWidth(font, line, size), JSON.stringify(line)).toBe(joinedWidth(font, line, size));
    });
  }
});
