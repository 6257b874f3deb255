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
import { type CharacteristicJson, buildSummary, characteristicJson } from './summary.ts';
import { type Brief, briefOf } from './pack/brief.ts';
import type { Workspace } from './workspace/load.ts';
import { LEDGER_FILE } from './workspace/ledger-file.ts';

/**
 * A characteristic reviewed: its brief, its assessment and its item of
 * summary.json. Those of a characteristic the build cache kept are read
 * back, or made, only when first asked for (most of a rebuild never asks).
 */
export interface Reviewed {
  readonly brief: Brief;
  assessment(): Assessment;
  json(): CharacteristicJson;
}

/** A characteristic an earlier build reviewed (the build cache): its brief, and its assessment when asked for (undefined if it cannot be read back: it is then made afresh). */
export interface KnownReview {
  readonly brief: Brief;
  assessment(): Assessment | undefined;
}

/** `known(i)` may give the i-th characteristic from an earlier build (the build cache), so it is not assessed again. */
export function assessAll(
  ws: Workspace,
  asOf: IsoDate,
  known: (index: number) => KnownReview | undefined = () => undefined,
  progress: (done: number, total: number) => void = () => {},
  assessed: (index: number, reviewed: Reviewed) => void = () => {},
): Reviewed[] {
  const period = ws.config.period;
  const analyseAt = (c: Workspace['characteristics'][number]) =>
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
  return ws.characteristics.map((c, i) => {
    progress(i, ws.characteristics.length);
    const k = known(i);
    let r: Reviewed;
    if (k) {
      let afresh: Assessment | undefined;
      const assessment = () => k.assessment() ?? (afresh ??= analyseAt(c));
      r = { brief: k.brief, assessment, json: () => characteristicJson(assessment(), period) };
    } else {
      const a = analyseAt(c);
      // Its item of summary.json, held until summary.json is written (the one call of json()), then
      // let go: a plant's items are hundreds of megabytes that nothing after needs.
      let json: CharacteristicJson | undefined = characteristicJson(a, period);
      const brief = briefOf(a, ws.config, json);
      r = {
        brief,
        assessment: () => a,
        json: () => {
          const made = json ?? characteristicJson(a, period);
          json = undefined;
          return made;
        },
      };
    }
    assessed(i, r);
    return r;
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

/** Every characteristic reviewed, with the ledger's integrity, the diagnostics and the exit code (`assessAll`'s arguments). */
export function reviewAll(
  ws: Workspace,
  asOf: IsoDate,
  previousLedger?: PreviousLedger,
  known?: (index: number) => KnownReview | undefined,
  progress?: (done: number, total: number) => void,
  /** Hears each characteristic as it is reviewed (or taken from `known`), in order: a build lays out its chart then. */
  assessed?: (index: number, reviewed: Reviewed) => void,
) {
  const reviewed = assessAll(ws, asOf, known, progress, assessed);
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
  const briefs = reviewed.map((r) => r.brief);
  const diagnostics = [...global, ...briefs.flatMap((b) => b.diagnostics)];
  const failed = briefs.some((b) => b.status !== 'assessed') || hasErrors(ws.diagnostics);
  return { reviewed, briefs, global, diagnostics, integrity, exitCode: (failed ? 1 : 0) as 0 | 1 };
}

/** The analysis alone: every characteristic reviewed and summary.json, without drawing anything (used by `check`). */
export function planSummary(ws: Workspace, asOf: IsoDate, previousLedger?: PreviousLedger) {
  const review = reviewAll(ws, asOf, previousLedger);
  const summary = buildSummary(ws.config, review.briefs, review.reviewed.map((r) => r.json()), review.global, asOf, review.integrity);
  return { ...review, assessments: review.reviewed.map((r) => r.assessment()), summary };
}
