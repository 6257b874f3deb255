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

/** What a previous pack's manifest says of the ledger, for the history check. */
export interface PreviousLedger {
  readonly asOf: string;
  readonly rows: number;
  readonly chain: readonly string[];
  /** Rewrites found by earlier builds, carried from pack to pack so a rebuild does not lose them. */
  readonly rewrites: readonly RewriteRecord[];
}

/** A rewrite of the ledger's history as the manifest keeps it. */
export interface RewriteRecord {
  readonly foundBy: string;
  readonly comparedWith: string;
  readonly row: number;
  readonly previousRows: number;
  readonly currentRows: number;
}

export interface Integrity {
  readonly chain: LedgerChain;
  /** Earlier rows changed or removed since the previous pack; null when none, or nothing to compare with. */
  readonly rewrite: (Rewrite & { readonly comparedWith: string }) | null;
  /** Every rewrite found so far, this build's last. */
  readonly rewrites: readonly RewriteRecord[];
}

/** The ledger against the previous pack's record of it; with no previous pack, nothing to compare. */
export function checkHistory(chain: LedgerChain, rows: readonly LedgerRow[], previous: PreviousLedger | undefined, asOf: string): Integrity {
  const found = previous ? findRewrite(previous, chain, rows) : null;
  const rewrite = found && previous ? { ...found, comparedWith: previous.asOf } : null;
  const rewrites: RewriteRecord[] = [
    ...(previous?.rewrites ?? []),
    ...(rewrite ? [{ foundBy: asOf, comparedWith: rewrite.comparedWith, row: rewrite.row, previousRows: rewrite.previousRows, currentRows: rewrite.currentRows }] : []),
  ];
  return { chain, rewrite, rewrites };
}

/** The history warning in one sentence, for the terminal, the pack and summary.json. */
export function rewriteSentence(r: NonNullable<Integrity['rewrite']>): string {
  const what =
    r.row > r.currentRows
      ? `the ledger now has ${r.currentRows} row${r.currentRows === 1 ? '' : 's'}, fewer than the ${r.previousRows} it had, so row ${r.row} onward was removed`
      : `row ${r.row} is not what it was (it now reads "${r.now!.cells.join(', ')}"): it was changed, or a row at or before it was removed or inserted`;
  return `Ledger history was rewritten since the pack built for ${r.comparedWith}: ${what}. The ledger is append-only; restore the earlier rows and record corrections as new rows.`;
}
