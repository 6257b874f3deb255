/**
 * Absurd sizes fail with a clear message on the right line, quickly and
 * without exhausting memory: a 10 MB field and a 100,000-column header.
 */
import { describe, expect, it } from 'vitest';
import { MAX_COLUMNS, MAX_RECORD_CHARS, readCsvTable } from '../../src/workspace/csv-table.ts';

describe('hostile sizes', () => {
  it('a 10 MB field: the row is refused on its line', () => {
    const text = `date,value\n2026-01-01,1\n2026-01-02,"${'x'.repeat(10 * 1024 * 1024)}"\n2026-01-03,3\n`;
    const r = readCsvTable(text, 'data/a.csv');
    expect(r.table).toBeUndefined();
    expect(r.diagnostics.map((d) => [d.file, d.line, d.ruleId])).toEqual([['data/a.csv', 3, 'csv/syntax']]);
    expect(r.diagnostics[0]!.message).toMatch(new RegExp(`longer than ${MAX_RECORD_CHARS.toLocaleString('en-GB')} characters`));
  });
  it('a header of 100,000 columns: refused on line 1, saying how many it has', () => {
    const head = Array.from({ length: 100_000 }, (_, i) => `c${i}`).join(',');
    const r = readCsvTable(`${head}\n${head.replace(/c\d+/g, '1')}\n`, 'data/b.csv');
    expect(r.table).toBeUndefined();
    expect(r.diagnostics.map((d) => [d.line, d.ruleId])).toEqual([[1, 'csv/too-many-columns']]);
    expect(r.diagnostics[0]!.message).toMatch(new RegExp(`has 100,000 columns; .* at most ${MAX_COLUMNS}`));
  });
});
