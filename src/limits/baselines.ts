/**
 * Splits a characteristic's points into baselines and gives each point the
 * limits it is judged against.
 *
 * - A baseline runs from its first point (the first point of the data, or a
 *   `baseline` entry) to the point before the next one.
 * - Trial limits rest on every usable (not excluded) point of the baseline
 *   and are recomputed as points arrive; until `minPoints` usable points
 *   exist there are none.
 * - A `freeze` fixes the limits on the usable points from the baseline's
 *   start through the named point; they apply to the whole baseline. A later
 *   freeze in the same baseline refreshes them (the ledger keeps both).
 * - Standard values, where given, replace limits from the data in every
 *   baseline.
 */
import { type Diagnostic, error, warning } from '../diagnostics.ts';
import type { LedgerEntry, Sample, Standard } from '../model.ts';
import type { ChartFamily, FamilyLimits } from '../stats/index.ts';
import type { LedgerState } from './ledger-state.ts';

export type LimitSource = 'data' | 'standard';

export interface Baseline {
  /** Index of the first sample of the baseline. */
  readonly start: number;
  /** One past the last sample. */
  readonly end: number;
  readonly status: 'trial' | 'frozen';
  readonly source: LimitSource;
  /** Sample indices the limits rest on (empty for standard values). */
  readonly basis: readonly number[];
  /** Usable points in the baseline, whether or not they are in the basis. */
  readonly usable: number;
  /** The `baseline` entry that opened it, absent for the first. */
  readonly opened?: LedgerEntry;
  /** The freeze that governs, for frozen limits from the data. */
  readonly frozenBy?: LedgerEntry;
  /** Null while the baseline is still collecting its first `minPoints` usable points. */
  readonly limits: FamilyLimits | null;
}

export interface BaselineOptions {
  readonly minPoints: number;
  readonly standard?: Standard | undefined;
  readonly ledgerFile: string;
  readonly characteristic: string;
}

export function buildBaselines(
  fam: ChartFamily,
  samples: readonly Sample[],
  state: LedgerState,
  opts: BaselineOptions,
): { baselines: Baseline[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const starts = [0, ...state.baselineStarts.map((b) => b.index)];
  const baselines: Baseline[] = [];
  starts.forEach((start, k) => {
    const end = starts[k + 1] ?? samples.length;
    const slice = samples.slice(start, end);
    const usableIdx: number[] = [];
    for (let i = start; i < end; i++) if (!state.excluded.has(i)) usableIdx.push(i - start);
    const opened = k > 0 ? state.baselineStarts[k - 1]!.entry : undefined;
    const freezes = state.freezes.filter((f) => f.index >= start && f.index < end);
    const where = (e: LedgerEntry) => ({ file: opts.ledgerFile, line: e.line, characteristic: opts.characteristic });
    const common = { start, end, usable: usableIdx.length, ...(opened ? { opened } : {}) };

    if (opts.standard) {
      for (const f of freezes) {
        diagnostics.push(
          warning('ledger/freeze-with-standard', where(f.entry), 'Limits come from the standard values in review.yaml, so this freeze changes nothing.'),
        );
      }
      baselines.push({ ...common, status: 'frozen', source: 'standard', basis: [], limits: fam.fromStandard(slice, opts.standard) });
      return;
    }

    // The latest freeze in ledger order governs; one that goes back before an
    // earlier freeze of the same baseline contradicts it.
    let governing: (typeof freezes)[number] | undefined;
    for (const f of freezes) {
      if (governing && f.index < governing.index) {
        diagnostics.push(
          error(
            'ledger/contradiction',
            where(f.entry),
            `Freeze at "${f.entry.point}" goes back before the freeze at "${governing.entry.point}" (line ${governing.entry.line}) in the same baseline; start a new baseline instead.`,
          ),
        );
        continue;
      }
      const basisCount = usableIdx.filter((i) => i + start <= f.index).length;
      if (basisCount < opts.minPoints) {
        diagnostics.push(
          error(
            'ledger/freeze-too-early',
            where(f.entry),
            `Freeze at "${f.entry.point}" would rest on ${basisCount} usable point${basisCount === 1 ? '' : 's'}; at least ${opts.minPoints} (minPoints) are needed.`,
          ),
        );
        continue;
      }
      governing = f;
    }

    if (governing) {
      const basis = usableIdx.filter((i) => i + start <= governing.index);
      baselines.push({
        ...common,
        status: 'frozen',
        source: 'data',
        basis: basis.map((i) => i + start),
        frozenBy: governing.entry,
        limits: fam.fromData(slice, basis),
      });
      return;
    }
    const enough = usableIdx.length >= opts.minPoints;
    // Enough points, but exclusions leave too few for limits: say so rather than quietly collecting.
    if (!enough && end - start >= opts.minPoints) {
      const last = [...state.excluded.entries()].filter(([i]) => i >= start && i < end).sort((a, b) => a[1].line - b[1].line).at(-1);
      if (last) {
        diagnostics.push(
          warning(
            'ledger/too-few-usable',
            where(last[1]),
            `Exclusions leave ${usableIdx.length} usable point${usableIdx.length === 1 ? '' : 's'} of ${end - start} in this baseline, fewer than the ${opts.minPoints} (minPoints) limits need, so it has no limits until more points arrive; check that each excluded point had an assignable cause.`,
          ),
        );
      }
    }
    baselines.push({
      ...common,
      status: 'trial',
      source: 'data',
      basis: usableIdx.map((i) => i + start),
      limits: enough ? fam.fromData(slice, usableIdx) : null,
    });
  });
  return { baselines, diagnostics };
}
