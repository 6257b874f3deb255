/**
 * From a loaded workspace to the planned pack: every output file with its
 * bytes, decided before anything is written.
 */
import { createHash } from 'node:crypto';
import { type Assessment, analyse } from './analyse.ts';
import { type Diagnostic, hasErrors } from './diagnostics.ts';
import type { IsoDate } from './model.ts';
import { buildSummary } from './summary.ts';
import { TOOL } from './version.ts';
import type { Workspace } from './workspace/load.ts';
import { LEDGER_FILE } from './workspace/ledger-file.ts';

export interface PlannedPack {
  /** Output path (relative to --out) → contents, in write order. */
  readonly files: ReadonlyMap<string, Uint8Array>;
  readonly assessments: readonly Assessment[];
  readonly diagnostics: readonly Diagnostic[];
  /** 0 when every characteristic was assessed, 1 otherwise. */
  readonly exitCode: 0 | 1;
}

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

const encoder = new TextEncoder();
const json = (value: unknown) => encoder.encode(`${JSON.stringify(value, null, 2)}\n`);

export function planPack(ws: Workspace, asOf: IsoDate): PlannedPack {
  const assessments = assessAll(ws, asOf);
  const summary = buildSummary(ws.config, assessments, ws.diagnostics, asOf);
  const files = new Map<string, Uint8Array>([['summary.json', json(summary)]]);
  const entries = (m: ReadonlyMap<string, Uint8Array>) =>
    [...m.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([p, b]) => ({ path: p, bytes: b.length, sha256: sha256(b) }));
  const inputs = entries(ws.inputs);
  const manifest = {
    tool: TOOL,
    asOf,
    // One hash over the input hashes: the pack's fingerprint of what it was built from.
    fingerprint: sha256(encoder.encode(inputs.map((i) => `${i.sha256}  ${i.path}`).join('\n'))),
    inputs,
    outputs: entries(files),
  };
  files.set('manifest.json', json(manifest));
  const diagnostics = [...ws.diagnostics, ...assessments.flatMap((a) => a.diagnostics)];
  const failed = assessments.some((a) => a.status !== 'assessed') || hasErrors(ws.diagnostics);
  return { files, assessments, diagnostics, exitCode: failed ? 1 : 0 };
}
