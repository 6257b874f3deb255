/**
 * The analysis of a whole workspace, without drawing anything: what `check`
 * needs, and the first half of `build`. Kept apart from the renderers so
 * that `check` does not load them.
 */
import { createHash } from 'node:crypto';
import { type Assessment, analyse } from './analyse.ts';
import { type Diagnostic, hasErrors, warning } from './diagnostics.ts';
import type { IsoDate } from './model.ts';
import { type PreviousLedger, checkHistory, ledgerChain, ledgerRows, rewriteSentence } from './review/ledger-chain.ts';
import { buildSummary } from './summary.ts';
import type { Workspace } from './workspace/load.ts';
import { LEDGER_FILE } from './workspace/ledger-file.ts';

/** `known(i)` may give the i-th characteristic's assessment from an earlier build (the build cache), so it is not redone. */
export function assessAll(
  ws: Workspace,
  asOf: IsoDate,
  known: (index: number) => Assessment | undefined = () => undefined,
  progress: (done: number, total: number) => void = () => {},
  assessed: (index: number, assessment: Assessment) => void = () => {},
): Assessment[] {
  return ws.characteristics.map((c, i) => {
    progress(i, ws.characteristics.length);
    const a =
      known(i) ??
      analyse({
        config: ws.config,
        characteristic: c.characteristic,
        samples: c.samples,
        laterLabels: c.laterLabels,
        ledger: c.ledger,
        ledgerFile: LEDGER_FILE,
        diagnostics: c.diagnostics,
        asOf,
      });
    assessed(i, a);
    return a;
  });
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

/** The analysis alone: assessments, summary.json and diagnostics, without drawing anything (used by `check`). */
export function planSummary(
  ws: Workspace,
  asOf: IsoDate,
  previousLedger?: PreviousLedger,
  known?: (index: number) => Assessment | undefined,
  progress?: (done: number, total: number) => void,
  /** Hears each assessment as it is made (or taken from `known`), in order: a build lays out its chart then. */
  assessed?: (index: number, assessment: Assessment) => void,
) {
  const assessments = assessAll(ws, asOf, known, progress, assessed);
  const { rows, chain } = ledgerOf(ws);
  const integrity = checkHistory(chain, rows, previousLedger, asOf);
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
