/** One ledger.csv row as text, quoted as CSV needs and guarded against spreadsheet formula injection. */
import type { LedgerAction } from '../model.ts';

export interface LedgerRow {
  readonly date: string;
  readonly characteristic: string;
  readonly action: LedgerAction;
  readonly point: string;
  readonly reason: string;
  readonly by: string;
}

export const LEDGER_COLUMNS = ['date', 'characteristic', 'action', 'point', 'reason', 'by'] as const;

export function csvField(value: string): string {
  // A leading = + - @ would make a spreadsheet evaluate the cell; a quote mark keeps it text.
  const safe = /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
  return /[",\r\n]/.test(safe) || safe !== safe.trim() ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/**
 * The inverse of the formula guard, for reading: a field written as '=…,
 * '+…, '-…, '@… is the text after the quote mark, so a guarded line reads
 * back as the label or reason it was written from.
 */
export function unguard(value: string): string {
  return /^'[=+\-@\t\r]/.test(value) ? value.slice(1) : value;
}

export function ledgerLine(row: LedgerRow): string {
  return LEDGER_COLUMNS.map((c) => csvField(row[c])).join(',');
}
