/**
 * The reader's fast paths against the general tools they stand in for:
 * the quote-free CSV splitter against csv-parse itself, and the arithmetic
 * calendar check against JavaScript's Date. Both are reference
 * implementations from outside this project.
 */
import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { plainRecords, readCsvTable } from '../../src/workspace/csv-table.ts';
import { isIsoDate } from '../../src/workspace/dates.ts';
import { readDataFile } from '../../src/workspace/data-file.ts';
import type { ConfiguredCharacteristic } from '../../src/model.ts';

const pad = (n: number, w: number) => String(n).padStart(w, '0');

describe('isIsoDate against Date', () => {
  const byDate = (y: number, m: number, d: number) => {
    const t = new Date(Date.UTC(y, m - 1, d));
    t.setUTCFullYear(y, m - 1, d);
    return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d;
  };
  it('agrees on every day number 0–32 of every month 0–13 from 1599 to 2401', () => {
    let checked = 0;
    for (let y = 1599; y <= 2401; y++) {
      for (let m = 0; m <= 13; m++) {
        for (let d = 0; d <= 32; d++) {
          const text = `${pad(y, 4)}-${pad(m, 2)}-${pad(d, 2)}`;
          const expected = m >= 1 && m <= 12 && d >= 1 && byDate(y, m, d);
          if (isIsoDate(text) !== expected) throw new Error(`${text}: isIsoDate ${isIsoDate(text)}, Date ${expected}`);
          checked++;
        }
      }
    }
    expect(checked).toBe(803 * 14 * 33);
    // The Gregorian leap rules, by hand: 1900 and 2100 are not leap years, 2000 and 2400 are.
    expect([isIsoDate('1900-02-29'), isIsoDate('2000-02-29'), isIsoDate('2100-02-29'), isIsoDate('2400-02-29'), isIsoDate('2024-02-29')]).toEqual([false, true, false, true, true]);
  });
});

describe('the quote-free CSV path reads what csv-parse reads', () => {
  // The same options the reader gives csv-parse for a file with quotes.
  const viaLibrary = (text: string, delimiter: string) =>
    (
      parse(text, { info: true, bom: true, delimiter, relax_column_count: true, skip_empty_lines: true, record_delimiter: ['\r\n', '\n', '\r'] }) as unknown as {
        record: string[];
        info: { lines: number };
      }[]
    ).map((r) => ({ line: r.info.lines, cells: r.record }));

  it('gives the same records and lines on any quote-free text', () => {
    const alphabet = fc.constantFrom('a', '1', ' ', ',', ';', '\n', '\r', '\r\n', '\t', '.', '\uFEFF');
    fc.assert(
      fc.property(fc.array(alphabet, { maxLength: 60 }).map((xs) => xs.join('')), fc.constantFrom(',', ';', '\t'), fc.boolean(), (body, delimiter, bom) => {
        const text = bom ? `\uFEFF${body}` : body;
        const ours = plainRecords(text, delimiter)!.map((r) => ({ line: r.info.lines, cells: r.record }));
        expect(ours).toEqual(viaLibrary(text, delimiter));
      }),
      { numRuns: 3000 },
    );
  });

  it('leaves quoted and overlong text to csv-parse', () => {
    expect(plainRecords('a,"b"\n', ',')).toBeUndefined();
    expect(plainRecords(`a,${'x'.repeat(1_000_001)}\n`, ',')).toBeUndefined();
  });

  it('reads a header and rows with their lines, line ends counted by hand: rows on lines 3, 4 and 6', () => {
    const read = readCsvTable('date,value\r\n\r\n2026-01-05,1.5\r2026-01-12,2\n\n2026-01-19,3\n', 'x.csv');
    expect(read.table?.rows.map((r) => r.line)).toEqual([3, 4, 6]);
  });
});

describe('distinct point labels: the rising-labels shortcut against a plain first-seen check', () => {
  // Strictly rising labels are all different, so the reader skips remembering them; any other order
  // goes through the check. The reference here keeps each label's first row and reports the others.
  const ch: ConfiguredCharacteristic = { id: 'a', name: 'A', chart: 'individuals', data: 'data/a.csv', unit: '', better: 'target', safety: false, tags: [] };
  it('keeps the first row of each label and reports every repeat, in rising, falling and mixed orders', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 30 }), { minLength: 1, maxLength: 40 }), fc.constantFrom('as drawn', 'sorted', 'sorted, distinct'), (drawn, order) => {
        const labels = order === 'as drawn' ? drawn : order === 'sorted' ? [...drawn].sort((x, y) => x - y) : [...new Set(drawn)].sort((x, y) => x - y);
        const names = labels.map((n) => `p${pad(n, 2)}`);
        const csv = `label,date,value\n${names.map((l, i) => `${l},2026-01-01,${i}`).join('\n')}\n`;
        const read = readDataFile(csv, ch, '2026-12-31');
        const firstLine = new Map<string, number>();
        const kept: string[] = [];
        const repeats: number[] = [];
        names.forEach((l, i) => {
          if (firstLine.has(l)) repeats.push(i + 2);
          else firstLine.set(l, i + 2), kept.push(l);
        });
        expect(read.samples.map((s) => s.label)).toEqual(kept);
        expect(read.samples.map((s) => s.line)).toEqual(kept.map((l) => firstLine.get(l)));
        expect(read.diagnostics.filter((d) => d.ruleId === 'data/duplicate-point').map((d) => d.line)).toEqual(repeats);
      }),
      { numRuns: 300, seed: 11 },
    );
  });
});
