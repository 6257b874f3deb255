/**
 * pack.pdf as plumbline writes it object by object (pdf-file.ts), read back
 * by pdf-lib (a general-purpose PDF library from the registry, parsing the
 * file independently of how it was written) and checked against ISO
 * 32000-1's rules for the cross-reference table, names, text strings and
 * dates, with the standard's own examples where it gives them.
 */
import path from 'node:path';
import { PDFArray, PDFDict, PDFDocument, PDFName, PDFRef } from 'pdf-lib';
import { beforeAll, describe, expect, it } from 'vitest';
import { planPack } from '../../src/build.ts';
import { PdfFile, dateString, name, textString } from '../../src/pack/pdf-file.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { ROOT } from '../helpers/cli.ts';

const latin1 = (b: Uint8Array) => Buffer.from(b).toString('latin1');

describe('pdf-file: the pieces, by ISO 32000-1', () => {
  it('writes names with #xx for delimiters and characters outside printable ASCII (§7.3.5, the standard\'s examples)', () => {
    expect(name('paired()parentheses')).toBe('/paired#28#29parentheses');
    expect(name('The_Key_of_F#_Minor')).toBe('/The_Key_of_F#23_Minor');
    expect(name('A;Name_With-Various***Characters?')).toBe('/A;Name_With-Various***Characters?');
    expect(name('Lime Green')).toBe('/Lime#20Green');
  });
  it('writes text strings as UTF-16BE with a byte-order mark (§7.9.2.2), and dates as D:YYYYMMDDHHmmSSZ (§7.9.4)', () => {
    // U+2014 EM DASH is 20 14 in UTF-16BE (The Unicode Standard); FE FF is the byte-order mark.
    expect(textString('A—B')).toBe('<FEFF004120140042>');
    expect(dateString(new Date('2026-11-30T00:00:00Z'))).toBe('(D:20261130000000Z)');
  });
  it('points each cross-reference entry at its object, 20 bytes an entry (§7.5.4)', () => {
    const file = new PdfFile();
    const later = file.reserve();
    const a = file.add('<<\n/Type /Catalog\n/Pages 3 0 R\n>>');
    file.put(later, '(written after its number was taken)');
    const s = file.stream({ Filter: '/FlateDecode' }, new Uint8Array([1, 2, 3, 0xff]));
    const info = file.add('<<\n>>');
    const bytes = latin1(file.finish(a, info));
    const start = Number(/startxref\n(\d+)\n%%EOF$/.exec(bytes)![1]);
    expect(bytes.slice(start, start + 5)).toBe('xref\n');
    const head = /^xref\n0 (\d+)\n/.exec(bytes.slice(start))!;
    const count = Number(head[1]);
    expect(count).toBe(5);
    const table = bytes.slice(start + head[0].length, start + head[0].length + 20 * count);
    expect(table.slice(0, 20)).toBe('0000000000 65535 f \n');
    for (let n = 1; n < count; n++) {
      const entry = table.slice(20 * n, 20 * n + 20);
      expect(entry).toMatch(/^\d{10} 00000 n \n$/);
      expect(bytes.slice(Number(entry.slice(0, 10))).startsWith(`${n} 0 obj\n`)).toBe(true);
    }
    expect(bytes).toContain(`${s} 0 obj\n<<\n/Filter /FlateDecode\n/Length 4\n>>\nstream\n\u0001\u0002\u0003\u00ff\nendstream`);
    expect(bytes).toMatch(/trailer\n<<\n\/Size 5\n\/Root 2 0 R\n\/Info 4 0 R\n>>/);
    expect(() => {
      const f = new PdfFile();
      f.reserve();
      f.finish(1, 1);
    }).toThrow(/never written/);
  });
});

describe('pack.pdf read back by pdf-lib', () => {
  let doc: PDFDocument;
  let pages: number;
  beforeAll(async () => {
    const loaded = loadWorkspace(path.join(ROOT, 'data/demo'));
    if (!loaded.ok) throw new Error('the demo does not load');
    const plan = await planPack(loaded.workspace, loaded.workspace.config.period.to, { paper: 'a4', png: false, jobs: 1 });
    doc = await PDFDocument.load(plan.files.get('pack.pdf')!, { updateMetadata: false, throwOnInvalidObject: true });
    pages = doc.getPageCount();
  }, 60_000);

  it('has its pages, of A4 size, and the document information', () => {
    expect(pages).toBeGreaterThan(19);
    for (const p of doc.getPages()) {
      // A4 is 210 × 297 mm (ISO 216): 595.28 × 841.89 points of 1/72 inch.
      expect(p.getWidth()).toBeCloseTo((210 / 25.4) * 72, 1);
      expect(p.getHeight()).toBeCloseTo((297 / 25.4) * 72, 1);
    }
    expect(doc.getTitle()).toBe('Monthly control-limit review — November 2026 (fictional demo)');
    expect(doc.getProducer()).toMatch(/^plumbline /);
    expect(doc.getCreationDate()?.toISOString()).toBe('2026-11-30T00:00:00.000Z');
  });

  it('links only to its own pages', () => {
    const pageRefs = new Set(doc.getPages().map((p) => p.ref.toString()));
    let links = 0;
    for (const p of doc.getPages()) {
      const annots = p.node.lookupMaybe(PDFName.of('Annots'), PDFArray);
      for (let i = 0; i < (annots?.size() ?? 0); i++) {
        const a = annots!.lookup(i, PDFDict);
        expect(a.get(PDFName.of('Subtype'))).toBe(PDFName.of('Link'));
        const dest = a.lookup(PDFName.of('Dest'), PDFArray);
        const target = dest.get(0);
        expect(target).toBeInstanceOf(PDFRef);
        expect(pageRefs.has(target.toString())).toBe(true);
        links++;
      }
    }
    // At least the contents page's entries, one per level-2 section.
    expect(links).toBeGreaterThan(19);
  });
});
