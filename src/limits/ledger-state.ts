/**
 * Replays one characteristic's ledger entries, in ledger order, over its
 * points: where baselines start, which points are excluded (and why), which
 * were reviewed, where the process changed and where limits were frozen.
 * Every entry that cannot stand becomes a diagnostic on its ledger line.
 */
import { type Diagnostic, error, warning } from '../diagnostics.ts';
import type { LedgerEntry, Sample } from '../model.ts';

export interface Mark {
  readonly index: number;
  readonly entry: LedgerEntry;
}

export interface LedgerState {
  /** Sample indices where a `baseline` entry starts a new baseline, ascending, without 0. */
  readonly baselineStarts: readonly Mark[];
  /** Exclusion in force per sample index, with the entry that made it. */
  readonly excluded: ReadonlyMap<number, LedgerEntry>;
  readonly reviewed: ReadonlyMap<number, readonly LedgerEntry[]>;
  readonly changes: readonly Mark[];
  /** Every freeze in ledger order; the baselines module decides which one governs. */
  readonly freezes: readonly Mark[];
  /** Entries that apply to this characteristic, for the ledger history. */
  readonly history: readonly LedgerEntry[];
}

export function replayLedger(
  ledgerFile: string,
  characteristic: string,
  samples: readonly Sample[],
  entries: readonly LedgerEntry[],
  laterLabels: ReadonlySet<string>,
): { state: LedgerState; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const where = (e: LedgerEntry) => ({ file: ledgerFile, line: e.line, characteristic });
  const indexOf = new Map(samples.map((s, i) => [s.label, i]));
  const baselineStarts = new Map<number, Mark>();
  const excluded = new Map<number, LedgerEntry>();
  const reviewed = new Map<number, LedgerEntry[]>();
  const changes: Mark[] = [];
  const freezes: Mark[] = [];
  const history: LedgerEntry[] = [];

  for (const e of entries) {
    history.push(e);
    if (e.action === 'note' && e.point === '') continue;
    const index = indexOf.get(e.point);
    if (index === undefined) {
      if (laterLabels.has(e.point)) {
        diagnostics.push(
          warning('ledger/point-after-period', where(e), `Point "${e.point}" lies after the review period, so this ${e.action} entry is not applied yet.`),
        );
      } else {
        diagnostics.push(
          error('ledger/unknown-point', where(e), `Characteristic "${characteristic}" has no point labelled "${e.point}".`),
        );
      }
      continue;
    }
    const mark = { index, entry: e };
    switch (e.action) {
      case 'baseline': {
        const earlier = baselineStarts.get(index);
        if (earlier) {
          diagnostics.push(
            error('ledger/contradiction', where(e), `A baseline already starts at "${e.point}" (line ${earlier.entry.line}).`),
          );
        } else if (index > 0) {
          baselineStarts.set(index, mark);
        }
        break;
      }
      case 'exclude': {
        const earlier = excluded.get(index);
        if (earlier) {
          diagnostics.push(
            error('ledger/contradiction', where(e), `Point "${e.point}" is already excluded (line ${earlier.line}); add an include first.`),
          );
        } else {
          excluded.set(index, e);
        }
        break;
      }
      case 'include':
        if (!excluded.delete(index)) {
          diagnostics.push(error('ledger/contradiction', where(e), `Point "${e.point}" is not excluded, so it cannot be included.`));
        }
        break;
      case 'freeze': {
        const superseded = [...baselineStarts.values()].find((b) => b.index > index);
        if (superseded) {
          diagnostics.push(
            error(
              'ledger/contradiction',
              where(e),
              `Freeze at "${e.point}" falls in a baseline that the baseline entry at "${superseded.entry.point}" (line ${superseded.entry.line}) has already closed.`,
            ),
          );
        } else {
          freezes.push(mark);
        }
        break;
      }
      case 'change':
        changes.push(mark);
        break;
      case 'reviewed':
        reviewed.set(index, [...(reviewed.get(index) ?? []), e]);
        break;
      case 'note':
        break;
    }
  }
  return {
    state: {
      baselineStarts: [...baselineStarts.values()].sort((a, b) => a.index - b.index),
      excluded,
      reviewed,
      changes: changes.sort((a, b) => a.index - b.index),
      freezes,
      history,
    },
    diagnostics,
  };
}
