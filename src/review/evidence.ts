/**
 * The evidence behind a limit decision, for one characteristic's current
 * baseline: where a persistent shift began, whether each recorded change
 * made a difference, what each exclusion did to the limits, how uncertain
 * the limits are, and how often noise alone would signal in the period.
 * Pure; the recommendation reads it and the pack shows it.
 */
import type { Better, LedgerEntry, Sample } from '../model.ts';
import type { Baseline } from '../limits/baselines.ts';
import type { LedgerState } from '../limits/ledger-state.ts';
import type { Signal } from '../signals/evaluate.ts';
import { type FalseAlarm, falseAlarmChance } from '../signals/false-alarm.ts';
import type { Rule } from '../signals/rule.ts';
import { type ChangeSeries, estimateChangePoint } from '../stats/change-point.ts';
import { type Comparison, SIGNIFICANCE, poissonRates, proportions, welch } from '../stats/compare.ts';
import type { ChartFamily, Limits } from '../stats/family.ts';
import { GAP_CHARTS } from '../stats/index.ts';
import { type LimitUncertainty, limitUncertainty } from '../stats/limit-uncertainty.ts';

/** The estimate is acted on (it moves the proposed baseline) only at or above this confidence (REFERENCE §5). */
export const CHANGE_CONFIDENCE = 0.95;

export interface ChangePointEvidence {
  /** Sample index of the first point of the new level. */
  readonly index: number;
  readonly interval: readonly [number, number];
  readonly before: number;
  readonly after: number;
  readonly significance: number;
  /** Reorderings the confidence rests on. */
  readonly permutations: number;
  /** Reorderings the full test draws; more than `permutations` when it stopped early, unable to reach CHANGE_CONFIDENCE. */
  readonly planned: number;
  readonly lr: number;
  readonly method: string;
}

export interface ChangeTest {
  readonly entry: LedgerEntry;
  readonly index: number;
  readonly comparison: Comparison;
  /** True when the difference points the better way, false the worse way, null for `better: target`. */
  readonly better: boolean | null;
  readonly significant: boolean;
}

export interface LimitMove {
  readonly limit: 'center' | 'ucl' | 'lcl';
  /** Limit without the excluded point (as used) and with it put back. */
  readonly without: number;
  readonly with: number;
  /** The move in sigmas of the plotted statistic, and in percent of the limit's value (null near zero). */
  readonly sigmas: number;
  readonly percent: number | null;
}

export interface ExclusionImpact {
  readonly index: number;
  readonly entry: LedgerEntry;
  /** `after-basis`: the point lies after the freeze, so its exclusion cannot move the frozen limits. */
  readonly effect: 'moved' | 'after-basis' | 'no-limits';
  readonly moves: readonly LimitMove[];
}

export interface Evidence {
  readonly changePoint: ChangePointEvidence | null;
  readonly changeTests: readonly ChangeTest[];
  readonly exclusions: readonly ExclusionImpact[];
  /** For the current baseline when its limits come from the data. */
  readonly uncertainty: LimitUncertainty | null;
  /** For the current baseline's points in the review period. */
  readonly falseAlarm: FalseAlarm | null;
  /** The limits a one-time refresh on every usable point would give (at the latest point), where one is suggested. */
  readonly refresh: Limits | null;
}

export interface EvidenceInput {
  readonly family: ChartFamily;
  readonly samples: readonly Sample[];
  readonly baselines: readonly Baseline[];
  readonly ledger: LedgerState;
  readonly locationValues: readonly number[];
  readonly signals: readonly Signal[];
  readonly better: Better;
  readonly inPeriod: (i: number) => boolean;
  readonly rules: readonly Rule[];
  readonly refreshAfter: number;
}

/**
 * Gap charts (g, t) are compared as event rates: each point is one event over
 * its gap's exposure — between + 1 opportunities for g (the geometric
 * likelihood, REFERENCE §5.4), the days for t, with a same-day event counted
 * as half a day since dates resolve whole days.
 */
function gapExposure(s: Sample): number {
  const o = s.observation;
  return o.kind === 'gap' ? o.between + 1 : o.kind === 'interval' ? Math.max(o.days, 0.5) : 1;
}

function seriesOf(fam: ChartFamily, samples: readonly Sample[], values: readonly number[], indices: readonly number[]): ChangeSeries {
  if (fam.standardKind === 'variables') return { kind: 'normal', values: indices.map((i) => values[i]!) };
  if (GAP_CHARTS.has(fam.id)) return { kind: 'poisson', counts: indices.map(() => 1), exposures: indices.map((i) => gapExposure(samples[i]!)) };
  const obs = indices.map((i) => samples[i]!.observation);
  if (fam.observation === 'proportion') {
    return {
      kind: 'binomial',
      defectives: obs.map((o) => (o.kind === 'proportion' ? o.defectives : 0)),
      inspected: obs.map((o) => (o.kind === 'proportion' ? o.inspected : 1)),
    };
  }
  return {
    kind: 'poisson',
    counts: obs.map((o) => (o.kind === 'rate' || o.kind === 'count' ? o.count : 0)),
    exposures: obs.map((o) => (o.kind === 'rate' ? o.exposure : 1)),
  };
}

function compare(s: ChangeSeries, split: number): Comparison | null {
  const sum = (xs: readonly number[], a: number, b: number) => xs.slice(a, b).reduce((t, x) => t + x, 0);
  if (s.kind === 'normal') {
    if (split < 2 || s.values.length - split < 2) return null;
    return welch(s.values.slice(0, split), s.values.slice(split));
  }
  const n = s.kind === 'poisson' ? s.counts.length : s.defectives.length;
  if (split < 1 || n - split < 1) return null;
  if (s.kind === 'poisson') {
    return poissonRates(
      { count: sum(s.counts, 0, split), exposure: sum(s.exposures, 0, split), periods: split },
      { count: sum(s.counts, split, n), exposure: sum(s.exposures, split, n), periods: n - split },
    );
  }
  return proportions(
    { defectives: sum(s.defectives, 0, split), inspected: sum(s.inspected, 0, split), periods: split },
    { defectives: sum(s.defectives, split, n), inspected: sum(s.inspected, split, n), periods: n - split },
  );
}

const directionOf = (c: Comparison) => (c.effect.kind === 'ratio' ? c.effect.value - 1 : c.effect.value);

export function gatherEvidence(input: EvidenceInput): Evidence {
  const { family: fam, samples, baselines, ledger } = input;
  const k = baselines.length - 1;
  const current = baselines[k]!;
  const usable = (a: number, b: number) => {
    const out: number[] = [];
    for (let i = a; i < b; i++) if (!ledger.excluded.has(i)) out.push(i);
    return out;
  };
  const fromData = current.source === 'data' && current.limits !== null;

  // Where a persistent shift on the values chart began, within the current baseline.
  let changePoint: ChangePointEvidence | null = null;
  const persistent = input.signals.some((s) => s.baseline === k && s.panel === 'location' && s.persistence === 'persistent');
  if (persistent && current.end - current.start >= 4) {
    const idx = usable(current.start, current.end);
    const est = estimateChangePoint(seriesOf(fam, samples, input.locationValues, idx), 1, CHANGE_CONFIDENCE);
    if (est) {
      // An np chart plots counts: give its levels per sample, not as fractions.
      const scale =
        fam.id === 'np'
          ? idx.reduce((t, i) => t + (samples[i]!.observation.kind === 'proportion' ? (samples[i]!.observation as { inspected: number }).inspected : 0), 0) / idx.length
          : 1;
      // Gap charts were estimated as event rates; give their levels as mean gaps.
      const level = (v: number) => (fam.id === 'g' ? 1 / v - 1 : fam.id === 't' ? 1 / v : v * scale);
      changePoint = {
        index: idx[est.at]!,
        interval: [idx[est.interval[0]]!, idx[est.interval[1]]!],
        before: level(est.before),
        after: level(est.after),
        significance: est.significance,
        permutations: est.permutations,
        planned: est.planned,
        lr: est.lr,
        method: est.method,
      };
    }
  }

  // Each recorded change inside the current baseline or opening it: the points after against the ones before.
  const changeTests: ChangeTest[] = [];
  for (const c of ledger.changes) {
    if (c.index < current.start || c.index >= current.end) continue;
    const home = baselines.find((b) => c.index - 1 >= b.start && c.index - 1 < b.end);
    if (!home) continue;
    const before = usable(home.start, c.index);
    const after = usable(c.index, current.end);
    const comparison = compare(seriesOf(fam, samples, input.locationValues, [...before, ...after]), before.length);
    if (!comparison) continue;
    const d = directionOf(comparison);
    // Gap charts are compared as event rates: a higher rate means shorter gaps.
    const rising = GAP_CHARTS.has(fam.id) ? d < 0 : d > 0;
    const better = input.better === 'target' || d === 0 ? null : rising === (input.better === 'higher');
    changeTests.push({ entry: c.entry, index: c.index, comparison, better, significant: comparison.p < SIGNIFICANCE });
  }

  // What each exclusion did: the limits with the point put back into the basis.
  const exclusions: ExclusionImpact[] = [];
  for (const [index, entry] of [...ledger.excluded.entries()].sort(([x], [y]) => x - y)) {
    const b = baselines.find((x) => index >= x.start && index < x.end)!;
    if (!b.limits || b.source !== 'data') {
      exclusions.push({ index, entry, effect: 'no-limits', moves: [] });
      continue;
    }
    const lastBasis = b.basis[b.basis.length - 1] ?? b.start;
    if (b.status === 'frozen' && index > lastBasis) {
      exclusions.push({ index, entry, effect: 'after-basis', moves: [] });
      continue;
    }
    const slice = samples.slice(b.start, b.end);
    const withPoint = [...b.basis, index].sort((x, y) => x - y).map((i) => i - b.start);
    const put = fam.fromData(slice, withPoint).location[index - b.start]!;
    const used = b.limits.location[index - b.start]!;
    const moves = (['center', 'ucl', 'lcl'] as const).map((limit) => ({
      limit,
      without: used[limit],
      with: put[limit],
      sigmas: used.sigma > 0 ? (put[limit] - used[limit]) / used.sigma : 0,
      percent: Math.abs(used[limit]) > 1e-12 ? ((put[limit] - used[limit]) / Math.abs(used[limit])) * 100 : null,
    }));
    exclusions.push({ index, entry, effect: 'moved', moves });
  }

  const slice = samples.slice(current.start, current.end);
  const uncertainty =
    fromData && current.limits ? limitUncertainty(fam, slice, current.basis.map((i) => i - current.start), current.limits) : null;

  let periodPoints = 0;
  for (let i = current.start; i < current.end; i++) if (input.inPeriod(i)) periodPoints++;
  const falseAlarm = current.limits && periodPoints > 0 ? falseAlarmChance(input.rules, periodPoints) : null;

  const all = usable(current.start, current.end);
  const refresh =
    fromData && current.status === 'frozen' && current.basis.length < input.refreshAfter && all.length >= input.refreshAfter
      ? (fam.fromData(slice, all.map((i) => i - current.start)).location[current.end - 1 - current.start] ?? null)
      : null;

  return { changePoint, changeTests, exclusions, uncertainty, falseAlarm, refresh };
}
