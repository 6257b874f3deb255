/**
 * The ledger's running hash: each row's hash covers the row and every row
 * before it (hᵢ = SHA-256(hᵢ₋₁ ␤ row i), h₀ the format's name), so a pack's
 * manifest fixes the ledger's history row by row. A later build compares the
 * previous pack's chain with the current ledger's: the ledger may only grow;
 * a row changed or removed shows as the first place the chains part.
 *
 * Rows are hashed as their parsed fields joined by the unit separator, so
 * line endings and CSV quoting do not count, only the content. Pure.
 */
import { createHash } from 'node:crypto';
import { readCsvTable } from '../workspace/csv-table.ts';

export const CHAIN_FORMAT = 'plumbline-ledger-chain-1';

export interface LedgerRow {
  /** Line of the row in ledger.csv. */
  readonly line: number;
  readonly cells: readonly string[];
}

export interface LedgerChain {
  readonly format: typeof CHAIN_FORMAT;
  readonly rows: number;
  /** The running hash after the last row (after none: the hash of the format's name). */
  readonly head: string;
  /** The running hash after each row, in order. */
  readonly chain: readonly string[];
}

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

/** The data rows of ledger.csv as read (every row, valid or not), or none when there is no ledger. */
export function ledgerRows(text: string | undefined): LedgerRow[] {
  if (text === undefined) return [];
  const read = readCsvTable(text, 'ledger.csv');
  return read.table ? read.table.rows.map((r) => ({ line: r.line, cells: r.cells })) : [];
}

export function ledgerChain(rows: readonly LedgerRow[]): LedgerChain {
  const chain: string[] = [];
  let h = sha256(CHAIN_FORMAT);
  for (const r of rows) {
    h = sha256(`${h}\n${r.cells.join('\u001f')}`);
    chain.push(h);
  }
  return { format: CHAIN_FORMAT, rows: rows.length, head: h, chain };
}

export interface Rewrite {
  /** 1-based number of the first earlier row that was changed or removed. */
  readonly row: number;
  readonly previousRows: number;
  readonly currentRows: number;
  /** That row as the ledger has it now, if it still has that many rows. */
  readonly now?: LedgerRow;
}

/** Null when the previous chain is a prefix of the current one: the ledger only grew. */
export function findRewrite(previous: { readonly rows: number; readonly chain: readonly string[] }, current: LedgerChain, rows: readonly LedgerRow[]): Rewrite | null {
  for (let i = 0; i < previous.rows; i++) {
    if (previous.chain[i] !== current.chain[i]) {
      return { row: i + 1, previousRows: previous.rows, currentRows: current.rows, ...(rows[i] ? { now: rows[i] } : {}) };
    }
  }
  return null;
}
