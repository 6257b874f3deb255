/**
 * fontkit loaded through fontkit-load.ts (its Brotli dictionary made on
 * first read, its compiled code kept) must be the library `require` gives:
 * the reference is @pdf-lib/fontkit itself, loaded from the registry
 * package with `require`, on the fonts the pack uses.
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { FontkitModule } from '../../src/render/fontkit.ts';
import { EAGER_DICTIONARY, loadFontkit } from '../../src/render/fontkit-load.ts';
import { loadFonts } from '../../src/render/fonts.ts';
import { ROOT } from '../helpers/cli.ts';

const require = createRequire(import.meta.url);
const reference = require('@pdf-lib/fontkit') as FontkitModule;
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-fontkit-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

describe('fontkit as plumbline loads it', () => {
  it('defers the one thing it means to: the installed bundle makes its Brotli dictionary where this module expects', () => {
    const source = readFileSync(require.resolve('@pdf-lib/fontkit'), 'utf8');
    expect(source.split(EAGER_DICTIONARY)).toHaveLength(2);
  });

  it('lays out text as the library loaded by require does, glyph for glyph', () => {
    const loaded = loadFontkit<FontkitModule>();
    expect(loaded).not.toBe(reference);
    const fonts = loadFonts();
    for (const face of [fonts.regular, fonts.semibold]) {
      const mine = loaded.create(face);
      const theirs = reference.create(face);
      expect([mine.postscriptName, mine.numGlyphs, mine.unitsPerEm]).toEqual([theirs.postscriptName, theirs.numGlyphs, theirs.unitsPerEm]);
      for (const text of ['Fill volume — line 3', 'office ﬁnal AVAV', '±0.12 ≤ 2026-11-30', 'Überprüfung ḡ']) {
        const a = mine.layout(text);
        const b = theirs.layout(text);
        expect(a.glyphs.map((g) => g.id), text).toEqual(b.glyphs.map((g) => g.id));
        expect(a.positions.map((p) => [p.xAdvance, p.yAdvance, p.xOffset, p.yOffset]), text).toEqual(b.positions.map((p) => [p.xAdvance, p.yAdvance, p.xOffset, p.yOffset]));
        expect(a.advanceWidth, text).toBe(b.advanceWidth);
      }
    }
  });

  it('keeps the compiled code in the temporary folder, in a private folder of the user\'s, and not where NODE_DISABLE_COMPILE_CACHE says not to', () => {
    const load = (env: Record<string, string>) =>
      spawnSync(process.execPath, ['--import', 'tsx', '-e', "import('./src/render/fontkit-load.ts').then((m) => console.log(typeof m.loadFontkit().create))"], {
        cwd: ROOT,
        encoding: 'utf8',
        env: { ...process.env, ...env },
      });
    const folder = `plumbline-compile-cache-${process.getuid!()}`;
    const off = path.join(temp, 'off');
    const on = path.join(temp, 'on');
    const a = load({ TMPDIR: off, NODE_DISABLE_COMPILE_CACHE: '1' });
    expect(a.stdout.trim()).toBe('function');
    expect(() => readdirSync(path.join(off, folder))).toThrow();
    for (let i = 0; i < 2; i++) expect(load({ TMPDIR: on }).stdout.trim()).toBe('function');
    // The patched text (UTF-16) and V8's code for it, under one key.
    const kept = readdirSync(path.join(on, folder)).sort();
    expect(kept).toEqual([expect.stringMatching(/^fontkit-[0-9a-f]{32}\.source$/), expect.stringMatching(/^fontkit-[0-9a-f]{32}\.v8code$/)]);
    expect(kept[0]!.slice(0, 40)).toBe(kept[1]!.slice(0, 40));
    const text = readFileSync(path.join(on, folder, kept[0]!)).toString('utf16le');
    const source = readFileSync(require.resolve('@pdf-lib/fontkit'), 'utf8');
    expect(text.length).toBeGreaterThan(source.length);
    expect(text).toContain(source.slice(0, 2000));
    expect(text).not.toContain(EAGER_DICTIONARY);
    // Only its owner may read or write the folder and the file (permission bits from POSIX stat).
    expect(statSync(path.join(on, folder)).mode & 0o777).toBe(0o700);
    for (const f of kept) expect(statSync(path.join(on, folder, f)).mode & 0o077).toBe(0);
    // A folder others can write into is not used: nothing is read from it or written to it.
    const shared = path.join(temp, 'shared');
    mkdirSync(path.join(shared, folder), { recursive: true });
    chmodSync(path.join(shared, folder), 0o777);
    expect(load({ TMPDIR: shared }).stdout.trim()).toBe('function');
    expect(readdirSync(path.join(shared, folder))).toEqual([]);
  });
});
