/**
 * The two number formatters: one for people (tables, labels) and one for
 * geometry (SVG and PDF path data). Both are deterministic and never write
 * an exponent, so outputs are byte-stable and pdf-lib's path parser, which
 * only knows spaces and commas as separators, always reads them.
 */

/** A value for a reader: fixed decimals, a true minus sign avoided (ASCII '-') so text stays searchable. */
export function fmt(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '–';
  const s = value.toFixed(decimals);
  // -0.00 reads as a sign error.
  return /^-0(\.0+)?$/.test(s) ? s.slice(1) : s;
}

/** Decimals that show a value with about `significant` significant digits, capped to keep tables tidy. */
export function decimalsFor(magnitude: number, significant = 4): number {
  if (!Number.isFinite(magnitude) || magnitude === 0) return 2;
  const digits = Math.floor(Math.log10(Math.abs(magnitude))) + 1;
  return Math.max(0, Math.min(6, significant - digits));
}

/** A coordinate in points, two decimals, no trailing zeros, no exponent. */
export function geom(value: number): string {
  if (!Number.isFinite(value)) throw new Error(`internal: non-finite coordinate ${value}`);
  const s = (Math.round(value * 100) / 100).toFixed(2).replace(/\.?0+$/, '');
  return s === '-0' ? '0' : s;
}

/** A percentage for a reader, e.g. 0.0123 → "1.23%". */
export function pct(fraction: number, decimals = 2): string {
  return `${fmt(fraction * 100, decimals)}%`;
}

/**
 * Text with the control characters removed (tab and line breaks become
 * spaces): XML forbids most of them, PDF text operators would carry them
 * literally, and none of them means anything in a label or a table cell.
 */
export function printable(s: string): string {
  return s.replace(/[\t\n\r]/g, ' ').replace(/[\u0000-\u001f\u007f-\u009f]/g, '');
}

/** A value for a sentence, with about four significant digits. */
export function fmtAuto(value: number): string {
  return fmt(value, decimalsFor(value));
}

/** "1 point", "3 points"; `many` for irregular plurals. */
export function plural(n: number, word: string, many = `${word}s`): string {
  return `${n} ${n === 1 ? word : many}`;
}
