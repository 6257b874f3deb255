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
import { fmt, fmtAuto, plural } from '../format.ts';
import type { Comparison } from '../stats/compare.ts';
import type { Limits } from '../stats/family.ts';
import { CHANGE_CONFIDENCE, type ChangeTest, type Evidence } from './evidence.ts';
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
  readonly evidence: Evidence;
  /** Sentences that bear on every action, e.g. that the limits are too tight for these data. */
  readonly advice?: readonly string[];
}

const TEST_NAMES: Readonly<Record<Comparison['method'], string>> = {
  'welch-t': "Welch's t-test",
  'exact-poisson-rates': 'exact test of two Poisson rates',
  'fisher-exact': "Fisher's exact test",
};

const num = fmtAuto;
/** B reorderings resolve a confidence to 1/B; all of them below reads "at least 1 − 1/B" (0.999 for the usual 999). */
export const confidenceText = (c: number, permutations = 999) => {
  const top = 1 - 1 / permutations;
  return c >= 1 - 1e-12 ? `at least ${fmt(top, 3)}` : fmt(c, 3);
};
/** A reason quotes at most this many point labels; a long series can flag hundreds. */
export const QUOTED_LABELS = 10;

/** `"a", "b", "c"`, or the first QUOTED_LABELS and how many more (summary.json and the signals table list them all). */
export function quoteSome(labels: readonly string[]): string {
  const shown = labels.slice(0, QUOTED_LABELS).map((l) => `"${l}"`).join(', ');
  const more = labels.length - QUOTED_LABELS;
  return more > 0 ? `${shown} and ${more} more` : shown;
}

const pValue = (p: number) => (p < 0.0001 ? 'p < 0.0001' : `p = ${fmt(p, p < 0.01 ? 4 : 3)}`);

/** "mean 10.2 → 9.1 (difference −1.1, 95 % interval −1.6 to −0.6; Welch's t-test, p = 0.0004)". */
export function describeComparison(c: Comparison): string {
  const level = c.method === 'welch-t' ? 'mean' : c.method === 'fisher-exact' ? 'fraction' : 'rate';
  const [lo, hi] = c.effect.interval;
  const effect = c.effect.kind === 'ratio' ? `rate ratio ${num(c.effect.value)}` : `difference ${num(c.effect.value)}`;
  return `${level} ${num(c.before)} → ${num(c.after)} (${effect}, 95% interval ${num(lo)} to ${num(hi)}; ${TEST_NAMES[c.method]}, ${pValue(c.p)})`;
}

function limitsText(l: Limits): string {
  return `center ${num(l.center)}, limits ${num(l.lcl)} to ${num(l.ucl)}`;
}

/** A recorded change explains a shift when it is no later than the first firing and at most this many points before the pattern. */
export const CHANGE_LEAD = 5;

function betterSide(better: Better, panel: Signal['panel']): Side | null {
  // Less spread is better whatever the characteristic's direction.
  if (panel === 'dispersion') return 'below';
  return better === 'higher' ? 'above' : better === 'lower' ? 'below' : null;
}

export function recommend(input: RecommendInput): Recommendation {
  const r = decide(input);
  return input.advice?.length ? { ...r, reasons: [...r.reasons, ...input.advice] } : r;
}

function decide(input: RecommendInput): Recommendation {
  const { samples, baselines } = input;
  const k = baselines.length - 1;
  const current = baselines[k]!;
  const label = (i: number) => samples[i]!.label;

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

  const { evidence } = input;
  const cpe = evidence.changePoint;
  // The estimated change point, when it is confident and lies inside the baseline, before the signal's first firing.
  const estimated = (s: Signal) =>
    s.panel === 'location' && cpe && cpe.significance >= CHANGE_CONFIDENCE && cpe.index > current.start && cpe.index <= s.flagged[0]! ? cpe.index : undefined;
  const estimateSentence = cpe
    ? `The level changed most likely at "${label(cpe.index)}" (${num(cpe.before)} → ${num(cpe.after)}; plausible from "${label(cpe.interval[0])}" to "${label(cpe.interval[1])}"; confidence ${confidenceText(cpe.significance, cpe.permutations)} by a permutation test).`
    : undefined;
  const improved: ChangeTest | undefined = evidence.changeTests.find(
    (t) => t.significant && t.better === true && t.index > current.start && t.comparison.periodsAfter >= input.minPoints,
  );
  const improvement = (t: ChangeTest): Recommendation => ({
    action: 're-baseline',
    reasons: [
      `The process change recorded at "${label(t.index)}" (ledger line ${t.entry.line}: ${t.entry.reason}) made a significant difference in the better direction: ${describeComparison(t.comparison)}.`,
      `Start a new baseline at "${label(t.index)}", the recorded change point; ${plural(current.end - t.index, 'point')} would rest on new trial limits.`,
    ],
    ledger: [ledgerLine({ date: input.asOf, characteristic: input.characteristic, action: 'baseline', point: label(t.index), reason: `Process change: ${t.entry.reason}`, by: '' })],
    changePoint: t.index,
  });

  if (open.length > 0) {
    const shifts: { signal: Signal; at: number; why: string; change?: LedgerEntry; estimated?: true }[] = [];
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
        const est = estimated(s);
        shifts.push({
          signal: s,
          at: est ?? s.points[0]!,
          ...(est !== undefined ? { estimated: true } : {}),
          why: `The shift is in the better direction (${s.panel === 'dispersion' ? 'less spread' : `${input.better} is better`}).`,
        });
      }
    }
    const cp = shifts.length > 0 ? Math.min(...shifts.map((x) => x.at)) : undefined;
    // After a recorded change shown to have worked, signals on the better side belong to the new level.
    const partOfImprovement = (s: Signal) =>
      improved !== undefined && s.flagged[0]! >= improved.index && s.side !== null && s.side === betterSide(input.better, s.panel);
    const blocking = open.filter((s) => !shifts.some((x) => x.signal === s) && !partOfImprovement(s) && (cp === undefined || s.flagged[0]! < cp));
    if (cp === undefined && improved && blocking.length === 0) return improvement(improved);
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
          ...(estimateSentence ? [estimateSentence] : []),
          ...evidence.changeTests.filter((t) => t.index === cp).map((t) => `Before and after the recorded change: ${describeComparison(t.comparison)}.`),
          `Start a new baseline at "${label(cp)}", the ${chosen.change ? 'recorded change point' : chosen.estimated ? 'estimated change point' : 'first point of the pattern'}; ${plural(current.end - cp, 'point')} would rest on new trial limits.`,
        ],
        ledger: [ledgerLine({ date: input.asOf, characteristic: input.characteristic, action: 'baseline', point: label(cp), reason, by: '' })],
        changePoint: cp,
      };
    }
    // One sentence per rule and panel, however often it fired.
    const groups = new Map<string, Signal[]>();
    for (const s of blocking) {
      const key = `${s.panel}:${s.rule}`;
      // Appended in place: copying the group for each signal is quadratic when a long series has thousands.
      const g = groups.get(key);
      if (g) g.push(s);
      else groups.set(key, [s]);
    }
    const reasons = [...groups.values()].map((g) => {
      const s = g[0]!;
      const at = quoteSome(g.flatMap((x) => x.flagged).map(label));
      const kinds = [...new Set(g.map((x) => x.persistence))].join(' and ');
      // A signal on the better side is a special cause too, but one to learn from rather than remove.
      const better = g.every((x) => x.side !== null && x.side === betterSide(input.better, x.panel));
      return (
        `Unexplained signal${g.length > 1 ? 's' : ''}: ${s.panel === 'dispersion' ? 'dispersion chart: ' : ''}${input.describeRule(s.rule)} Fired at ${at} (${kinds}).` +
        (better ? ` ${g.length > 1 ? 'They lie' : 'It lies'} on the better side: an improvement worth understanding; if it lasts, the limits will call for a new baseline.` : '')
      );
    });
    if (blocking.some((s) => s.persistence === 'persistent' && s.side !== null)) {
      reasons.push(
        'A persistent shift with no recorded process change and not in the better direction: bring the process back rather than move the limits.',
      );
      if (estimateSentence) reasons.push(estimateSentence);
    }
    if (cp !== undefined) reasons.push(`A later shift at "${label(cp)}" may call for a new baseline once the earlier signals are explained.`);
    reasons.push('Look for the assignable cause; record what was found as a reviewed entry, or exclude the point if a cause was found and removed.');
    return { action: 'investigate', reasons, ledger: [] };
  }

  if (improved) return improvement(improved);
  const pending = evidence.changeTests
    .filter((t) => t.index > current.start && t !== improved)
    .map((t) => {
      const head = `The change recorded at "${label(t.index)}" (ledger line ${t.entry.line})`;
      if (t.significant && t.better === true) {
        return `${head} already differs significantly in the better direction (${describeComparison(t.comparison)}), but ${plural(t.comparison.periodsAfter, 'point')} after it are fewer than the ${input.minPoints} a new baseline needs; re-baseline once there are ${input.minPoints}.`;
      }
      if (t.significant) return `${head} is followed by a significant difference that is not an improvement: ${describeComparison(t.comparison)}.`;
      return (
        `${head} shows no significant difference yet: ${describeComparison(t.comparison)}.` +
        (t.comparison.morePeriods !== null && t.comparison.morePeriods > 0
          ? ` If the difference seen is real, about ${plural(t.comparison.morePeriods, 'more period')} would typically show it.`
          : ' A difference this small would take far more data to show.')
      );
    });

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
        `Before freezing, explain the earlier ${unexplained.length === 1 ? 'signal' : 'signals'} at ${quoteSome(unexplained.map((s) => label(s.flagged[0]!)))} with a reviewed or exclude entry.`,
      );
    }
    return { action: 'keep', reasons: [...reasons, ...pending], ledger: [] };
  }

  const reasons: string[] = [];
  if (current.source === 'standard') reasons.push('Limits come from the standard values given; no signal in the review period.');
  else reasons.push(`Frozen limits on ${plural(current.basis.length, 'point')} hold; no unexplained signal in the review period.`);
  if (!samples.slice(current.start, current.end).some((_, j) => inPeriod(current.start + j))) {
    reasons.push('No points fall in the review period.');
  }
  if (current.source === 'data' && current.basis.length < input.refreshAfter && current.usable >= input.refreshAfter) {
    reasons.push(
      `For information: the baseline now has ${current.usable} usable points while its limits rest on ${current.basis.length}; a one-time refresh (a new freeze at the latest point) is possible if nothing has changed${evidence.refresh ? `, giving ${limitsText(evidence.refresh)}` : ''}.`,
    );
  }
  return { action: 'keep', reasons: [...reasons, ...pending], ledger: [] };
}
