/**
 * Layouts kept between builds (fontkit.ts: rememberWords, wordsShaped): a
 * font given an earlier build's words, pairs and plain characters must lay
 * out every word as @pdf-lib/fontkit itself does (the registry library,
 * opened here without plumbline's wrapper, is the reference), without
 * shaping the kept words again; a kept layout that cannot be this font's is
 * shaped afresh, never used.
 */
import { createRequire } from 'node:module';
import { deserialize, serialize } from 'node:v8';
import { describe, expect, it } from 'vitest';
import { type FontkitFont, type FontkitModule, type StoredLayouts, fontkit, rememberWords, wordsShaped } from '../../src/render/fontkit.ts';
import { loadFonts } from '../../src/render/fonts.ts';

const reference = createRequire(import.meta.url)('@pdf-lib/fontkit') as FontkitModule;
const bytes = loadFonts().regular;
const refFont = reference.create(bytes);
/** A font file's bytes as a new object: fontkit.ts makes one font per object, so each is a fresh start. */
const copy = () => new Uint8Array(bytes);

/** What a caller reads of a run: glyph numbers, the four fields of each position, the advance width. */
const fields = (run: ReturnType<FontkitFont['layout']>) => ({
  ids: run.glyphs.map((g) => g.id),
  positions: run.positions.map((p) => [p.xAdvance, p.yAdvance, p.xOffset, p.yOffset]),
  advanceWidth: run.advanceWidth,
});

// Words with letters (shaped whole, kept), figures (laid out from pairs), a kerned pair ("AV"), a ligature candidate.
const WORDS = ['Fill', 'volume', 'AVAV', 'office', 'Überprüfung', '12.5', '2026-11-30', '±0.12', 'investigate', 'Ledger'];

describe('layouts kept between builds', () => {
  it('lay out every word as fontkit does, with none of the kept words shaped again', () => {
    const first = copy();
    const a = fontkit.create(first);
    for (const w of WORDS) expect(fields(a.layout(w)), w).toEqual(fields(refFont.layout(w)));
    const kept = wordsShaped(first)!;
    // Words with letters are kept; figures are laid out from their pairs, which are kept instead.
    expect([...kept.words.keys()].sort()).toEqual(['AVAV', 'Fill', 'Ledger', 'investigate', 'office', 'volume', 'Überprüfung'].sort());
    expect(kept.pairs.size).toBeGreaterThan(0);
    expect(kept.plain).toContain('5'.charCodeAt(0));
    expect(kept.fresh).toBeGreaterThan(0);

    // Through the cache's own encoding, as the next build reads them.
    const stored = deserialize(serialize({ words: kept.words, pairs: kept.pairs, plain: kept.plain })) as StoredLayouts;
    const second = copy();
    rememberWords(second, stored);
    const b = fontkit.create(second);
    for (const w of WORDS) expect(fields(b.layout(w)), w).toEqual(fields(refFont.layout(w)));
    // A line is its words joined by the space, as before.
    expect(fields(b.layout('Fill volume 12.5'))).toEqual(fields(a.layout('Fill volume 12.5')));
    expect(wordsShaped(second)!.fresh).toBe(0);
    // A word no build kept is shaped.
    expect(fields(b.layout('Weekly'))).toEqual(fields(refFont.layout('Weekly')));
    expect(wordsShaped(second)!.fresh).toBe(1);
  });

  it('shapes a kept word afresh where its layout cannot be this font\'s', () => {
    const good = refFont.layout('Fill');
    const bad: StoredLayouts = {
      words: new Map([
        // A glyph number past the font's last glyph.
        ['Fill', { ids: [refFont.numGlyphs + 5], codePoints: [[70]], positions: [1, 0, 0, 0], advanceWidth: 1 }],
        // Positions that do not match the glyphs.
        ['volume', { ids: [1, 2], codePoints: [[118], [111]], positions: [1, 0, 0], advanceWidth: 1 }],
      ]),
      pairs: new Map([[0x31 * 0x10000 + 0x32, { xAdvance: 'x' } as never]]),
      plain: [-1],
    };
    const data = copy();
    rememberWords(data, bad);
    const font = fontkit.create(data);
    expect(fields(font.layout('Fill'))).toEqual(fields(good));
    expect(fields(font.layout('volume'))).toEqual(fields(refFont.layout('volume')));
    // The malformed pair and plain characters are not taken: figures are laid out as fontkit does.
    expect(fields(font.layout('12'))).toEqual(fields(refFont.layout('12')));
    expect(wordsShaped(data)!.fresh).toBeGreaterThanOrEqual(2);
  });
});
