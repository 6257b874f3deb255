/** Strict number cells: plain decimal notation only, so "NaN", "Infinity", "1,5" and "12 kg" are refused. */
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export type NumberCell = { ok: true; value: number } | { ok: false; problem: string };

export function parseNumberCell(text: string): NumberCell {
  if (text === '') return { ok: false, problem: 'is empty' };
  if (!NUMBER.test(text)) return { ok: false, problem: `"${text.length > 40 ? `${text.slice(0, 40)}…` : text}" is not a number` };
  const value = Number(text);
  if (!Number.isFinite(value)) return { ok: false, problem: `"${text}" is too large to be a finite number` };
  return { ok: true, value };
}
