/**
 * The analysis of a whole workspace, without drawing anything: what `check`
 * needs, and the first half of `build`. Kept apart from the renderers so
 * that `check` does not load them.
 */
import { createHash } from 'node:crypto';
import { type Assessment, analyse } from './analyse.ts';
import { type Diagnostic, hasErrors, warning } from './diagnostics.ts';
import type { IsoDate } from './model.ts';
import { type LedgerChain, type Rewrite, findRewrite, ledgerChain, ledgerRows } from './review/ledger-chain.ts';
import { buildSummary } from './summary.ts';
import type { Workspace } from './workspace/load.ts';
import { LEDGER_FILE } from './workspace/ledger-file.ts';

export function assessAll(ws: Workspace, asOf: IsoDate): Assessment[] {
  return ws.characteristics.map((c) =>
    analyse({
      config: ws.config,
      characteristic: c.characteristic,
      samples: c.samples,
      laterLabels: c.laterLabels,
      ledger: c.ledger,
      ledgerFile: LEDGER_FILE,
      diagnostics: c.diagnostics,
      asOf,
    }),
  );
}

export function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** The ledger as rows and its running hash, from the bytes the workspace read. */
export function ledgerOf(ws: Workspace) {
  const bytes = ws.inputs.get(LEDGER_FILE);
  const rows = ledgerRows(bytes ? new TextDecoder().decode(bytes) : undefined);
  return { rows, chain: ledgerChain(rows) };
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

/** The analysis alone: assessments, summary.json and diagnostics, without drawing anything (used by `check`). */
export function planSummary(ws: Workspace, asOf: IsoDate, previousLedger?: PreviousLedger) {
  const assessments = assessAll(ws, asOf);
  const { rows, chain } = ledgerOf(ws);
  const found = previousLedger ? findRewrite(previousLedger, chain, rows) : null;
  const rewrite = found ? { ...found, comparedWith: previousLedger!.asOf } : null;
  const rewrites: RewriteRecord[] = [
    ...(previousLedger?.rewrites ?? []),
    ...(rewrite ? [{ foundBy: asOf, comparedWith: rewrite.comparedWith, row: rewrite.row, previousRows: rewrite.previousRows, currentRows: rewrite.currentRows }] : []),
  ];
  const integrity: Integrity = { chain, rewrite, rewrites };
  const history: Diagnostic[] = integrity.rewrite
    ? [
        warning(
          'ledger/history-rewritten',
          { file: LEDGER_FILE, ...(integrity.rewrite.now ? { line: integrity.rewrite.now.line } : {}) },
          rewriteSentence(integrity.rewrite),
        ),
      ]
    : [];
  const global = [...history, ...ws.diagnostics];
  const summary = buildSummary(ws.config, assessments, global, asOf, integrity);
  const diagnostics = [...global, ...assessments.flatMap((a) => a.diagnostics)];
  const failed = assessments.some((a) => a.status !== 'assessed') || hasErrors(ws.diagnostics);
  return { assessments, summary, diagnostics, integrity, exitCode: (failed ? 1 : 0) as 0 | 1 };
}

/** The history warning in one sentence, for the terminal, the pack and summary.json. */
export function rewriteSentence(r: NonNullable<Integrity['rewrite']>): string {
  const what =
    r.row > r.currentRows
      ? `the ledger now has ${r.currentRows} row${r.currentRows === 1 ? '' : 's'}, fewer than the ${r.previousRows} it had, so row ${r.row} onward was removed`
      : `row ${r.row} is not what it was (it now reads "${r.now!.cells.join(', ')}"): it was changed, or a row at or before it was removed or inserted`;
  return `Ledger history was rewritten since the pack built for ${r.comparedWith}: ${what}. The ledger is append-only; restore the earlier rows and record corrections as new rows.`;
}

