/**
 * A CSV file as a header and rows that remember their line. Accepts a UTF-8
 * byte-order mark and any mix of CRLF, LF and CR line ends; reports a broken
 * quote, a duplicated or empty header name and a row of the wrong length.
 */
import { parse } from 'csv-parse/sync';
import { type Diagnostic, error } from '../diagnostics.ts';

export interface CsvRow {
  /** Line of the row's first character (1-based). */
  readonly line: number;
  readonly cells: readonly string[];
}

export interface CsvTable {
  readonly header: readonly string[];
  readonly headerLine: number;
  readonly rows: readonly CsvRow[];
}

interface Parsed {
  record: string[];
  info: { lines: number };
}

const NEWLINES = /\r\n|\n|\r/g;

/** Longest row read, in characters: far beyond any real row, short of exhausting memory on a runaway quote. */
export const MAX_RECORD_CHARS = 1_000_000;
/** Most columns a header may have; every file plumbline reads has at most seven. */
export const MAX_COLUMNS = 1000;

export function readCsvTable(text: string, file: string, characteristic?: string, delimiter = ','): { table?: CsvTable; diagnostics: Diagnostic[] } {
  const where = (line?: number, column?: number) => ({ file, line, column, characteristic });
  if (text.includes('\u0000')) {
    return { diagnostics: [error('csv/not-text', where(1), 'The file is not UTF-8 text (it holds NUL bytes; UTF-16 perhaps). Save it as UTF-8 CSV.')] };
  }
  let records: Parsed[];
  const simple = plainRecords(text, delimiter);
  if (simple) records = simple;
  else try {
    records = parse(text, {
      info: true,
      bom: true,
      delimiter,
      max_record_size: MAX_RECORD_CHARS,
      relax_column_count: true,
      skip_empty_lines: true,
      record_delimiter: ['\r\n', '\n', '\r'],
    }) as unknown as Parsed[];
  } catch (e) {
    const err = e as { code?: string; lines?: number; message?: string };
    const plain =
      err.code === 'CSV_MAX_RECORD_SIZE'
        ? `A row is longer than ${MAX_RECORD_CHARS.toLocaleString('en-GB')} characters; no data row needs that many. Look for a quote mark that is never closed, or a field pasted in by mistake.`
        : err.code === 'CSV_QUOTE_NOT_CLOSED'
        ? 'A quoted field is never closed; check the quote marks.'
        : err.code === 'INVALID_OPENING_QUOTE' || err.code === 'CSV_INVALID_CLOSING_QUOTE'
          ? 'A quote mark stands inside a field that is not quoted; wrap the field in quotes and double the quote mark.'
          : `The CSV cannot be read: ${String(err.message).split('\n')[0]}`;
    const line = err.code === 'CSV_QUOTE_NOT_CLOSED' ? (openQuoteLine(text, delimiter) ?? err.lines ?? 1) : (err.lines ?? 1);
    return { diagnostics: [error('csv/syntax', where(line), plain)] };
  }
  const rows: CsvRow[] = records
    .map((r) => ({ line: simple ? r.info.lines : r.info.lines - r.record.reduce((n, c) => n + (c.match(NEWLINES)?.length ?? 0), 0), cells: r.record }))
    // A row of nothing but empty cells (",,,") carries no data.
    .filter((r) => r.cells.some((c) => c.trim() !== ''));
  const headerRow = rows.shift();
  if (!headerRow) return { diagnostics: [error('csv/empty', where(1), 'The file is empty; it needs a header row naming its columns.')] };

  const diagnostics: Diagnostic[] = [];
  if (headerRow.cells.length > MAX_COLUMNS) {
    return { diagnostics: [error('csv/too-many-columns', where(headerRow.line), `The header has ${headerRow.cells.length.toLocaleString('en-GB')} columns; plumbline's files have a handful, and it reads at most ${MAX_COLUMNS}. Is this the right file, with the right delimiter?`)] };
  }
  const header = headerRow.cells.map((h) => h.trim());
  // One header cell holding another common delimiter: the file is separated by that one. Say so, not a cascade of row errors.
  const other = header.length === 1 ? [';', '\t', '|', ','].find((d) => d !== delimiter && header[0]!.includes(d)) : undefined;
  if (other) {
    const shown = other === '\t' ? 'a tab' : `"${other}"`;
    const setting = other === '\t' ? '"\\t"' : `"${other}"`;
    return {
      diagnostics: [
        error(
          'csv/delimiter',
          where(headerRow.line),
          `The header "${header[0]!.slice(0, 60)}" reads as one column: this file separates its fields with ${shown}, not "${delimiter}". Set csv: {delimiter: ${setting}${other === ';' ? ', decimal: ","' : ''}} in review.yaml, for this characteristic or the whole workspace.`,
        ),
      ],
    };
  }
  const seen = new Set<string>();
  header.forEach((h, i) => {
    if (h === '') {
      if (i === header.length - 1) return; // a trailing delimiter
      diagnostics.push(error('csv/empty-header', where(headerRow.line, columnOf(header, i)), `Column ${i + 1} of the header has no name.`));
    } else if (seen.has(h)) {
      diagnostics.push(error('csv/duplicate-column', where(headerRow.line, columnOf(header, i)), `Column "${h}" appears twice in the header.`));
    }
    seen.add(h);
  });
  // A trailing delimiter on the header (and on rows) leaves an empty last column; drop it.
  const trailing = header.length > 1 && header.at(-1) === '';
  const width = trailing ? header.length - 1 : header.length;
  const body: CsvRow[] = [];
  for (const r of rows) {
    const cells = trailing || (r.cells.length === width + 1 && r.cells.at(-1)!.trim() === '') ? r.cells.slice(0, width) : r.cells;
    if (cells.length !== width) {
      diagnostics.push(
        error('csv/row-length', where(r.line), `This row has ${cells.length} field${cells.length === 1 ? '' : 's'}; the header has ${width}.`),
      );
      continue;
    }
    body.push({ line: r.line, cells: cells.map((c) => c.trim()) });
  }
  return { table: { header: header.slice(0, width), headerLine: headerRow.line, rows: body }, diagnostics };
}

/**
 * The records of a file with no quote mark and no overlong line, split
 * directly: what csv-parse returns for such a file (same BOM handling, line
 * ends, skipped empty lines and line numbers), without the per-record
 * bookkeeping that makes a million-row file cost gigabytes. Any other file
 * goes to csv-parse. Undefined when the file needs it.
 */
export function plainRecords(text: string, delimiter: string): Parsed[] | undefined {
  if (text.includes('"')) return undefined;
  const start = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const out: Parsed[] = [];
  let line = 1;
  let from = start;
  const n = text.length;
  while (from <= n) {
    let to = from;
    while (to < n) {
      const c = text.charCodeAt(to);
      if (c === 10 || c === 13) break;
      to++;
    }
    if (to - from > MAX_RECORD_CHARS) return undefined;
    if (to > from) out.push({ record: text.slice(from, to).split(delimiter), info: { lines: line } });
    if (to >= n) break;
    // CRLF is one line end; a lone CR or LF is one too.
    from = text.charCodeAt(to) === 13 && text.charCodeAt(to + 1) === 10 ? to + 2 : to + 1;
    line++;
  }
  return out;
}

/** Approximate character column of field i in a simple (unquoted) line, with a one-character delimiter. */
export function columnOf(cells: readonly string[], i: number): number {
  let col = 1;
  for (let k = 0; k < i; k++) col += (cells[k]?.length ?? 0) + 1;
  return col;
}

/** The line where a quoted field opens and is never closed (csv-parse reports the end of the file instead). */
function openQuoteLine(text: string, delimiter: string): number | undefined {
  let line = 1;
  let inQuote = false;
  let opened = 0;
  let fieldStart = true;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (inQuote) {
      if (ch === '"') {
        if (text[i + 1] === '"') i++;
        else inQuote = false;
      } else if (ch === '\n' || (ch === '\r' && text[i + 1] !== '\n')) line++;
      continue;
    }
    if (ch === '"' && fieldStart) {
      inQuote = true;
      opened = line;
    }
    if (ch === '\n' || (ch === '\r' && text[i + 1] !== '\n')) line++;
    fieldStart = ch === delimiter || ch === '\n' || ch === '\r';
  }
  return inQuote ? opened : undefined;
}
