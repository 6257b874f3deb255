/**
 * The recommendation for a characteristic's current baseline, in the order
 * DESIGN.md fixes: collecting → investigate or re-baseline → freeze → keep.
 * Reasons are sentences for the pack; ledger lines are ready to append.
 */
import type { Better, IsoDate, LedgerEntry, Sample } from '../model.ts';
import type { Baseline } from '../limits/baselines.ts';
import type { Mark } from '../limits/ledger-state.ts';
import type { Signal } from '../signals/evaluate.ts';
import type { Side } from '../signals/rule.ts';
import { ledgerLine } from './ledger-line.ts';

export type Action = 'keep' | 'freeze' | 're-baseline' | 'investigate';

export interface Recommendation {
  readonly action: Action;
  readonly reasons: readonly string[];
  /** CSV lines for ledger.csv, without a line end. */
  readonly ledger: readonly string[];
  /** Sample index where a re-baseline would start the new baseline. */
  readonly changePoint?: number;
}

export interface RecommendInput {
  readonly characteristic: string;
  readonly better: Better;
  readonly samples: readonly Sample[];
  readonly baselines: readonly Baseline[];
  readonly signals: readonly Signal[];
  readonly changes: readonly Mark[];
  readonly period: { readonly from: IsoDate; readonly to: IsoDate };
  readonly minPoints: number;
  readonly freezeAfter: number;
  /** Date written on proposed ledger lines. */
  readonly asOf: IsoDate;
  /** Points (or subgroups) after which a frozen baseline resting on fewer may be refreshed. */
  readonly refreshAfter: number;
  readonly describeRule: (id: string) => string;
}

/** A recorded change explains a shift when it is no later than the first firing and at most this many points before the pattern. */
export const CHANGE_LEAD = 5;

function betterSide(better: Better, panel: Signal['panel']): Side | null {
  // Less spread is better whatever the characteristic's direction.
  if (panel === 'dispersion') return 'below';
  return better === 'higher' ? 'above' : better === 'lower' ? 'below' : null;
}

export function recommend(input: RecommendInput): Recommendation {
  const { samples, baselines } = input;
  const k = baselines.length - 1;
  const current = baselines[k]!;
  const label = (i: number) => samples[i]!.label;
  const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

  if (current.end === current.start) return { action: 'keep', reasons: ['There are no points yet.'], ledger: [] };

  if (!current.limits) {
    return {
      action: 'keep',
      reasons: [
        `Collecting: ${current.usable} of ${input.minPoints} usable points in the current baseline; trial limits start at ${input.minPoints}.`,
      ],
      ledger: [],
    };
  }

  const inPeriod = (i: number) => {
    const d = samples[i]!.date;
    return d >= input.period.from && d <= input.period.to;
  };
  const mine = input.signals.filter((s) => s.baseline === k);
  const open = mine.filter((s) => !s.explained && s.flagged.some(inPeriod));

  if (open.length > 0) {
    const shifts: { signal: Signal; at: number; why: string; change?: LedgerEntry }[] = [];
    for (const s of open) {
      if (s.persistence !== 'persistent') continue;
      const first = s.flagged[0]!;
      const change = input.changes.find(
        (c) => c.index > current.start && c.index <= first && c.index >= s.points[0]! - CHANGE_LEAD,
      );
      if (change) {
        shifts.push({
          signal: s,
          at: change.index,
          change: change.entry,
          why: `The shift follows the process change recorded at "${label(change.index)}" (ledger line ${change.entry.line}: ${change.entry.reason}).`,
        });
      } else if (s.side !== null && s.side === betterSide(input.better, s.panel)) {
        shifts.push({
          signal: s,
          at: s.points[0]!,
          why: `The shift is in the better direction (${s.panel === 'dispersion' ? 'less spread' : `${input.better} is better`}).`,
        });
      }
    }
    const cp = shifts.length > 0 ? Math.min(...shifts.map((x) => x.at)) : undefined;
    const blocking = open.filter((s) => !shifts.some((x) => x.signal === s) && (cp === undefined || s.flagged[0]! < cp));
    const describe = (s: Signal) =>
      `${s.panel === 'dispersion' ? 'Dispersion chart: ' : ''}${input.describeRule(s.rule)} Fired at ${s.flagged.map(label).map((l) => `"${l}"`).join(', ')}` +
      ` (${s.persistence}${s.side ? `, ${s.side} the center line` : ''}).`;

    if (cp !== undefined && blocking.length === 0) {
      const chosen = shifts.find((x) => x.at === cp)!;
      const reason = chosen.change
        ? `Process change: ${chosen.change.reason}`
        : `Sustained shift ${chosen.signal.side} the center line from ${label(cp)}`;
      return {
        action: 're-baseline',
        reasons: [
          `A persistent shift: ${describe(chosen.signal)}`,
          chosen.why,
          `Start a new baseline at "${label(cp)}", the ${chosen.change ? 'recorded change point' : 'first point of the pattern'}; ${plural(current.end - cp, 'point')} would rest on new trial limits.`,
        ],
        ledger: [ledgerLine({ date: input.asOf, characteristic: input.characteristic, action: 'baseline', point: label(cp), reason, by: '' })],
        changePoint: cp,
      };
    }
    // One sentence per rule and panel, however often it fired.
    const groups = new Map<string, Signal[]>();
    for (const s of blocking) groups.set(`${s.panel}:${s.rule}`, [...(groups.get(`${s.panel}:${s.rule}`) ?? []), s]);
    const reasons = [...groups.values()].map((g) => {
      const s = g[0]!;
      const at = g.flatMap((x) => x.flagged).map((i) => `"${label(i)}"`);
      const kinds = [...new Set(g.map((x) => x.persistence))].join(' and ');
      return `Unexplained signal${g.length > 1 ? 's' : ''}: ${s.panel === 'dispersion' ? 'dispersion chart: ' : ''}${input.describeRule(s.rule)} Fired at ${at.join(', ')} (${kinds}).`;
    });
    if (blocking.some((s) => s.persistence === 'persistent' && s.side !== null)) {
      reasons.push(
        'A persistent shift with no recorded process change and not in the better direction: bring the process back rather than move the limits.',
      );
    }
    if (cp !== undefined) reasons.push(`A later shift at "${label(cp)}" may call for a new baseline once the earlier signals are explained.`);
    reasons.push('Look for the assignable cause; record what was found as a reviewed entry, or exclude the point if a cause was found and removed.');
    return { action: 'investigate', reasons, ledger: [] };
  }

  const latest = current.end - 1;
  if (current.status === 'trial') {
    const unexplained = mine.filter((s) => !s.explained);
    if (current.usable >= input.freezeAfter && unexplained.length === 0) {
      return {
        action: 'freeze',
        reasons: [
          `Trial limits rest on ${plural(current.usable, 'usable point')} (at least ${input.freezeAfter}) with no unexplained signal.`,
          `Freeze them through the latest point, "${label(latest)}", and extend them forward.`,
        ],
        ledger: [
          ledgerLine({
            date: input.asOf,
            characteristic: input.characteristic,
            action: 'freeze',
            point: label(latest),
            reason: `Trial limits stable over ${current.usable} usable points`,
            by: '',
          }),
        ],
      };
    }
    const reasons = [`Trial limits on ${plural(current.usable, 'usable point')}; they keep being recomputed until ${input.freezeAfter}.`];
    if (unexplained.length > 0) {
      reasons.push(
        `Before freezing, explain the earlier ${unexplained.length === 1 ? 'signal' : 'signals'} at ${unexplained
          .map((s) => `"${label(s.flagged[0]!)}"`)
          .join(', ')} with a reviewed or exclude entry.`,
      );
    }
    return { action: 'keep', reasons, ledger: [] };
  }

  const reasons: string[] = [];
  if (current.source === 'standard') reasons.push('Limits come from the standard values given; no signal in the review period.');
  else reasons.push(`Frozen limits on ${plural(current.basis.length, 'point')} hold; no unexplained signal in the review period.`);
  if (!samples.slice(current.start, current.end).some((_, j) => inPeriod(current.start + j))) {
    reasons.push('No points fall in the review period.');
  }
  if (current.source === 'data' && current.basis.length < input.refreshAfter && current.usable >= input.refreshAfter) {
    reasons.push(
      `For information: the baseline now has ${current.usable} usable points while its limits rest on ${current.basis.length}; a one-time refresh (a new freeze at the latest point) is possible if nothing has changed.`,
    );
  }
  return { action: 'keep', reasons, ledger: [] };
}
