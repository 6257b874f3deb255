/**
 * The analysis of a whole workspace, without drawing anything: what `check`
 * needs, and the first half of `build`. Kept apart from the renderers so
 * that `check` does not load them.
 */
import { createHash } from 'node:crypto';
import { type Assessment, analyse } from './analyse.ts';
import { hasErrors } from './diagnostics.ts';
import type { IsoDate } from './model.ts';
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

/** The analysis alone: assessments, summary.json and diagnostics, without drawing anything (used by `check`). */
export function planSummary(ws: Workspace, asOf: IsoDate) {
  const assessments = assessAll(ws, asOf);
  const summary = buildSummary(ws.config, assessments, ws.diagnostics, asOf);
  const diagnostics = [...ws.diagnostics, ...assessments.flatMap((a) => a.diagnostics)];
  const failed = assessments.some((a) => a.status !== 'assessed') || hasErrors(ws.diagnostics);
  return { assessments, summary, diagnostics, exitCode: (failed ? 1 : 0) as 0 | 1 };
}

