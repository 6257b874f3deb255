/**
 * The three renderers of one scene: satori's standalone SVG (text as glyph
 * paths), the inline SVG of the HTML pack (text as text), PNG through resvg,
 * and vector drawing into a PDF read back by poppler's pdftotext.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { inflateSync } from 'node:zlib';
import { PDFDocument } from 'pdf-lib';
import { afterAll, describe, expect, it } from 'vitest';
import { fontkit, shapingFontkit } from '../../src/render/fontkit.ts';
import { scenePdf } from '../../src/pack/pdf.ts';
import { pdfFontProgram } from '../../src/render/pdf-font.ts';
import { glyphHex } from '../../src/render/pdf-ink.ts';
import { seeded } from '../../src/stats/random.ts';
import { svgToPng } from '../../src/render/png.ts';
import type { Scene } from '../../src/render/scene/types.ts';
import { inlineSvg } from '../../src/render/svg-inline.ts';
import { Resvg } from '@resvg/resvg-js';
import satori from 'satori';
import { FONT_FAMILY } from '../../src/render/fonts.ts';
import { LabelPaths, renderStandaloneSvg } from '../../src/render/svg-satori.ts';
import { fonts, sceneOf, texts } from '../helpers/charts.ts';
import { assess, assessed, ledgerCsv, pointsCsv } from '../helpers/in-memory.ts';
import { streams } from '../helpers/pdf.ts';
import { absolutePoints } from '../helpers/svg-path.ts';

const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-render-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

const values = Array.from({ length: 30 }, (_, i) => 10 + (i % 2 === 0 ? 0.4 : -0.4) + (i === 20 ? 4 : 0));
const scene: Scene = {
  ...sceneOf(assessed(assess({ chart: 'individuals', csv: pointsCsv('date,value', values.map((v) => [v])), ledger: ledgerCsv([]) }))),
  title: 'Fill <volume> & "head" 3',
};

/** Decodes an 8-bit RGBA PNG (what resvg writes) and counts pixels that are not white. */
function inkedPixels(png: Uint8Array): { width: number; height: number; inked: number } {
  const buf = Buffer.from(png);
  expect(buf.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
  let off = 8;
  let width = 0;
  let height = 0;
  const idat: Buffer[] = [];
  while (off < buf.length) {
    const len = buf.readUInt32BE(off);
    const type = buf.toString('latin1', off + 4, off + 8);
    const data = buf.subarray(off + 8, off + 8 + len);
    if (type === 'IHDR') {
      width = data.readUInt32BE(0);
      height = data.readUInt32BE(4);
      expect([data[8], data[9]]).toEqual([8, 6]);
    }
    if (type === 'IDAT') idat.push(data);
    off += 12 + len;
  }
  const raw = inflateSync(Buffer.concat(idat));
  const stride = width * 4;
  const prev = Buffer.alloc(stride);
  const row = Buffer.alloc(stride);
  let inked = 0;
  // PNG filters (ISO/IEC 15948, section 9): undo them row by row.
  for (let y = 0; y < height; y++) {
    const f = raw[y * (stride + 1)]!;
    for (let x = 0; x < stride; x++) {
      const v = raw[y * (stride + 1) + 1 + x]!;
      const a = x >= 4 ? row[x - 4]! : 0;
      const b = prev[x]!;
      const c = x >= 4 ? prev[x - 4]! : 0;
      const p = a + b - c;
      const pa = Math.abs(p - a);
      const pb = Math.abs(p - b);
      const pc = Math.abs(p - c);
      const paeth = pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
      row[x] = (v + [0, a, b, (a + b) >> 1, paeth][f]!) & 255;
    }
    for (let x = 0; x < stride; x += 4) if (row[x]! < 250 || row[x + 1]! < 250 || row[x + 2]! < 250) inked++;
    row.copy(prev);
  }
  return { width, height, inked };
}

describe('standalone SVG (satori)', () => {
  it('has an escaped <title> and a <desc>, labels as glyph paths and no <text>', async () => {
    const svg = await renderStandaloneSvg(scene, fonts);
    expect(svg.startsWith('<svg ')).toBe(true);
    expect(svg).toContain('<title>Fill &lt;volume&gt; &amp; &quot;head&quot; 3</title>');
    expect(svg).toMatch(/<desc>Individuals and moving range chart of X: 30 points/);
    expect(svg).not.toMatch(/<text[\s>]/);
    expect(svg).toMatch(/<path fill="#1f1f1f" transform="translate\([\d.]+ [\d.]+\)" d="M/);
  });
  it('is byte-identical for the same scene', async () => {
    expect(await renderStandaloneSvg(scene, fonts)).toBe(await renderStandaloneSvg(scene, fonts));
  });
});

describe('standalone SVG: labels laid out once and reused', () => {
  const labelScene = (labels: { x: number; y: number; text: string; size: number; weight: 400 | 600 }[]): Scene => ({
    width: 320,
    height: 120,
    title: 't',
    desc: 'd',
    items: labels.map((l) => ({ kind: 'text', ...l, anchor: 'start', width: 0, fill: '#1f1f1f' })),
  });
  const raster = (svg: string) => new Resvg(svg, { font: { loadSystemFonts: false, fontFiles: [fonts.regularPath] } }).render().pixels;
  const labels = [
    { x: 10, y: 20, text: 'UCL 53.24', size: 9, weight: 400 as const },
    { x: 40, y: 60, text: 'Moving range (mm)', size: 9.5, weight: 600 as const },
    { x: 12, y: 100, text: 'Characteristic 1 — ąé σ', size: 14, weight: 600 as const },
  ];

  it('draws each label exactly where satori draws it in one direct call (pixel for pixel, on whole-point positions)', async () => {
    // The reference: satori laying out the same labels itself, as absolutely placed text in one tree.
    const direct = await satori(
      {
        type: 'div',
        props: {
          style: { display: 'flex', position: 'relative', width: 320, height: 120, backgroundColor: '#ffffff' },
          children: labels.map((l) => ({
            type: 'div',
            props: {
              style: { display: 'flex', position: 'absolute', left: l.x, top: l.y - 0.875 * l.size + 0.01, fontFamily: FONT_FAMILY, fontSize: l.size, fontWeight: l.weight, lineHeight: 1, color: '#1f1f1f', whiteSpace: 'nowrap' },
              children: l.text,
            },
          })),
        },
      } as unknown as Parameters<typeof satori>[0],
      {
        width: 320,
        height: 120,
        fonts: [
          { name: FONT_FAMILY, data: fonts.regular.slice().buffer, weight: 400, style: 'normal' },
          { name: FONT_FAMILY, data: fonts.semibold.slice().buffer, weight: 600, style: 'normal' },
        ],
      },
    );
    const ours = raster(await renderStandaloneSvg(labelScene(labels), fonts, new LabelPaths(fonts)));
    const theirs = raster(direct);
    let differing = 0;
    for (let i = 0; i < ours.length; i++) if (Math.abs(ours[i]! - theirs[i]!) > 8) differing++;
    // Path data is kept to satori's 0.1 pt, so only anti-aliasing may differ, and barely.
    expect(differing / ours.length).toBeLessThan(0.002);
    expect(ours.length).toBe(320 * 120 * 4);
  });

  it('gives a label the same bytes whichever labels shared its batch', async () => {
    const alone = new LabelPaths(fonts);
    await alone.prepare([labels[1]!]);
    const crowded = new LabelPaths(fonts);
    await crowded.prepare([...Array.from({ length: 700 }, (_, i) => ({ text: `tick ${i}`, size: 9, weight: 400 as const })), labels[0]!, labels[2]!, labels[1]!]);
    expect(crowded.size).toBe(703);
    expect(crowded.paths(labels[1]!)).toEqual(alone.paths(labels[1]!));
    expect(alone.paths(labels[1]!).join('')).toMatch(/^M[\d.]+ -?[\d.]+/);
    const scene = labelScene(labels);
    expect(await renderStandaloneSvg(scene, fonts, crowded)).toBe(await renderStandaloneSvg(scene, fonts, new LabelPaths(fonts)));
  });

  it('puts the baseline on the label\'s y and the capitals at the font\'s cap height, at every size the scene uses', async () => {
    // "HL" sits on the baseline with flat tops at the cap height: 698 of 1,000 units in IBM Plex Sans's
    // OS/2 table (read here with fontkit, the font's own figure). Sizes 10 and 7.5 once landed a point high.
    const face = fontkit.create(fonts.regular);
    for (const size of [7.5, 9, 9.5, 10, 14]) {
      const svg = await renderStandaloneSvg(labelScene([{ x: 20, y: 50, text: 'HL', size, weight: 400 }]), fonts, new LabelPaths(fonts));
      const m = /translate\(([\d.]+) ([\d.]+)\)" d="([^"]+)"/.exec(svg)!;
      const ys = absolutePoints(m[3]!).map(([, y]) => y + Number(m[2]));
      expect(Math.max(...ys)).toBeCloseTo(50, 5);
      expect(Math.abs(Math.min(...ys) - (50 - (face.capHeight / face.unitsPerEm) * size))).toBeLessThanOrEqual(0.051);
    }
  });

  it('draws nothing for an empty or blank label, and never a stray marker colour', async () => {
    const svg = await renderStandaloneSvg(labelScene([{ x: 5, y: 20, text: ' ', size: 9, weight: 400 }, ...labels]), fonts, new LabelPaths(fonts));
    expect(svg).not.toMatch(/#0000[0-9a-f]{2}/);
    expect(svg.match(/transform="translate/g)?.length).toBe(3);
  });
});

describe('inline SVG (HTML pack)', () => {
  it('keeps every label as a <text> element with the scene’s words, escaped', () => {
    const html = inlineSvg(scene, 'chart-x');
    const found = [...html.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
    expect(found).toHaveLength(texts(scene).length);
    expect(found.filter((t) => /^UCL \d+\.\d+$/.test(t!))).toHaveLength(2);
    expect(html).toContain('<title id="chart-x-title">Fill &#x3C;volume> &#x26; "head" 3</title>');
    expect(html).toMatch(/aria-labelledby="chart-x-title chart-x-desc"/);
  });
});

describe('PNG (resvg)', () => {
  it('renders at the asked width, with the labels inked (our font, no system fonts)', async () => {
    const svg = await renderStandaloneSvg(scene, fonts);
    const full = inkedPixels(svg ? svgToPng(svg, [fonts.regularPath], scene.width * 2) : new Uint8Array());
    const bare = inkedPixels(svgToPng(await renderStandaloneSvg({ ...scene, items: scene.items.filter((p) => p.kind !== 'text') }, fonts), [fonts.regularPath], scene.width * 2));
    expect(full.width).toBe(scene.width * 2);
    expect(full.height).toBe(scene.height * 2);
    // The labels add ink: thousands of pixels at twice the size.
    expect(full.inked - bare.inked).toBeGreaterThan(5000);
  });
});

describe('PDF drawing', () => {
  it('draws the labels as real text that a PDF reader extracts, and the geometry as vector paths', async () => {
    const bytes = await scenePdf(scene, fonts);
    const file = path.join(temp, 'chart.pdf');
    writeFileSync(file, bytes);
    const extracted = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
    for (const t of ['Individuals and moving range chart', 'Individual value', 'Moving range', 'UCL', 'LCL', 'beyond a limit']) expect(extracted).toContain(t);
    // Paths are drawn with PDF path operators (l = line to, re = rectangle, c = curve to; ISO 32000-1 §8.5.2), not as an image.
    expect(Buffer.from(bytes).toString('latin1')).not.toMatch(/\/Subtype\s*\/Image/);
    const ops = streams(bytes).join('\n');
    expect((ops.match(/ (l|re)\n/g) ?? []).length).toBeGreaterThan(100);
    expect((ops.match(/ c\n/g) ?? []).length).toBeGreaterThan(100);
    expect(execFileSync('qpdf', ['--check', file], { encoding: 'utf8' })).toMatch(/No syntax or stream encoding errors/);
  });
});

describe('PDF text as the font’s own glyph numbers', () => {
  it('reads back as the text it was shaped from: a ligature as its letters, a letter the font lacks from its decomposed form', async () => {
    // Plex Sans shapes "fi" as its ligature glyph, which its cmap maps to U+FB01; and it has no
    // precomposed ḡ (U+1E21), only g and the combining macron. First in this file: fontkit keeps the
    // code points a ligature glyph was first made from in a process (pdf-lib's embedders read the
    // same), and the next test lays out U+FB01 itself.
    const fk = fontkit.create(fonts.regular);
    expect(fk.layout('fi').glyphs).toHaveLength(1);
    expect(fk.layout('\u1e21').glyphs[0]!.id).toBe(0);

    const bytes = await scenePdf({ ...scene, items: [...scene.items.filter((p) => p.kind !== 'text'), { kind: 'text', x: 10, y: 20, text: 'fine \u1e21 = 13.35', size: 12, weight: 400, anchor: 'start', fill: '#000000', width: 80 }] } as Scene, fonts);
    const file = path.join(temp, 'shaped.pdf');
    writeFileSync(file, bytes);
    expect(execFileSync('pdftotext', [file, '-'], { encoding: 'utf8' }).normalize('NFC')).toContain('fine \u1e21 = 13.35');
    // No .notdef (glyph 0) is drawn: no four-digit group of a shown string is 0000.
    const shown = streams(bytes).flatMap((st) => [...st.matchAll(/<([0-9A-F]*)> Tj/g)].map((m) => m[1]!));
    expect(shown.length).toBeGreaterThan(0);
    expect(shown.flatMap((h) => h.match(/.{4}/g) ?? [])).not.toContain('0000');
  });
  // The reference is pdf-lib's embedder of a whole font (no subset), whose encodeText writes the
  // glyphs of fontkit's layout as four hex digits each (Identity-H). Seeded sequences of repeating
  // and new strings, long ones (not remembered) among them, in both weights.
  it('gives what pdf-lib’s whole-font embedder gives for every string, in any order', async () => {
    const doc = await PDFDocument.create();
    doc.registerFontkit(fontkit);
    const reference = { regular: await doc.embedFont(fonts.regular, { subset: false }), semibold: await doc.embedFont(fonts.semibold, { subset: false }) };
    const next = seeded(11);
    const words = ['UCL', 'LCL', '2026-11', '12.5', 'keep', 'freeze', 'ﬁne', 'fine', 'Ω', 'x̄', 'Δ ±', 'a'.repeat(41), 'Moving range chart of the fill volume, line 1 (mL)'];
    for (let k = 0; k < 1000; k++) {
      const w = `${words[Math.floor(next() * words.length)]}${next() < 0.3 ? ` ${Math.floor(next() * 50)}` : ''}`;
      const weight = next() < 0.5 ? 'regular' : 'semibold';
      expect(glyphHex(fontkit.create(fonts[weight]), w).hex, w).toBe(reference[weight].encodeText(w).toString());
    }
  });
});

describe('the font program embedded in pack.pdf', () => {
  // Checked by an independent reader (fontkit, parsing the file afresh) and against the OpenType
  // specification's table directory rules: each table's checksum is the sum of its big-endian
  // uint32s, and the whole file sums to 0xB1B0AFBA once head.checkSumAdjustment is set.
  it('keeps the glyphs, widths and metrics a reader draws with, drops the shaping tables, and has valid checksums', () => {
    const program = pdfFontProgram(fonts.regular);
    expect(program.length).toBeLessThan(fonts.regular.length / 2);
    const original = shapingFontkit.create(Buffer.from(fonts.regular));
    const kept = shapingFontkit.create(Buffer.from(program));
    expect(kept.numGlyphs).toBe(original.numGlyphs);
    for (const id of [0, 3, 10, 194, 500, original.numGlyphs - 1]) {
      expect(kept.getGlyph(id).path.toSVG()).toBe(original.getGlyph(id).path.toSVG());
      expect(kept.getGlyph(id).advanceWidth).toBe(original.getGlyph(id).advanceWidth);
    }
    const view = new DataView(program.buffer, program.byteOffset, program.byteLength);
    const sum = (from: number, length: number) => {
      let s = 0;
      for (let i = from; i < from + length; i += 4) s = (s + (i + 4 <= program.length ? view.getUint32(i) : 0)) >>> 0;
      return s;
    };
    const tags: string[] = [];
    for (let i = 0; i < view.getUint16(4); i++) {
      const at = 12 + 16 * i;
      const tag = String.fromCharCode(...program.subarray(at, at + 4));
      tags.push(tag);
      const [offset, length] = [view.getUint32(at + 8), view.getUint32(at + 12)];
      // head's own checksum is taken with checkSumAdjustment as zero.
      const adjust = tag === 'head' ? view.getUint32(offset + 8) : 0;
      expect((sum(offset, (length + 3) & ~3) - adjust) >>> 0, tag).toBe(view.getUint32(at + 4));
    }
    expect(tags).toEqual(['OS/2', 'cvt ', 'fpgm', 'glyf', 'head', 'hhea', 'hmtx', 'loca', 'maxp', 'name', 'prep']);
    expect(sum(0, program.length)).toBe(0xb1b0afba);
  });
});

describe('one fontkit font per font file, shared by the metrics and every PDF', () => {
  it('is parsed once, and each PDF still numbers its own subset’s glyphs from the first it uses', async () => {
    expect(fontkit.create(fonts.regular)).toBe(fontkit.create(fonts.regular));
    expect(fontkit.create(fonts.regular)).not.toBe(fontkit.create(fonts.semibold));
    const embed = async () => {
      const doc = await PDFDocument.create();
      doc.registerFontkit(fontkit);
      return doc.embedFont(fonts.regular, { subset: true });
    };
    const [first, second] = [await embed(), await embed()];
    // In a subset, glyph 0 is .notdef; the glyphs a document uses are numbered 1, 2, … in order of first use.
    expect(first.encodeText('b').toString()).toBe('<0001>');
    expect(first.encodeText('a').toString()).toBe('<0002>');
    expect(second.encodeText('a').toString()).toBe('<0001>');
    expect(second.encodeText('ab').toString()).toBe('<00010002>');
  });
});
