/** Strict number cells: plain decimal notation only, so "NaN", "Infinity", "1,5" and "12 kg" are refused. */
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export type NumberCell = { ok: true; value: number } | { ok: false; problem: string };

/**
 * With `decimal: ','` the decimal mark is a comma ("1,5"); a point is then
 * refused rather than guessed at, since "1.500" may mean one and a half or
 * fifteen hundred. No thousands separators either way.
 */
export function parseNumberCell(text: string, decimal: '.' | ',' = '.'): NumberCell {
  if (text === '') return { ok: false, problem: 'is empty' };
  const shown = text.length > 40 ? `${text.slice(0, 40)}…` : text;
  if (decimal === ',') {
    if (text.includes('.')) return { ok: false, problem: `"${shown}" has a point, but this file's decimal mark is a comma (csv: decimal: ","); write 1,5 for one and a half, with no thousands separator` };
    text = text.replace(',', '.');
  }
  if (!NUMBER.test(text)) return { ok: false, problem: `"${shown}" is not a number` };
  const value = Number(text);
  if (!Number.isFinite(value)) return { ok: false, problem: `"${text}" is too large to be a finite number` };
  return { ok: true, value };
}
