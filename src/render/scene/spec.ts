/**
 * A chart in data units: what is plotted, against which limits, and what is
 * marked. Built once per characteristic from its assessment; the layout
 * turns it into a scene in points. Pure.
 */
import type { Assessed } from '../../analyse.ts';
import { fmt, printable } from '../../format.ts';
import type { IsoDate } from '../../model.ts';
import { RULES, rule } from '../../signals/rule-sets.ts';
import type { Signal } from '../../signals/evaluate.ts';
import type { Limits } from '../../stats/family.ts';
import { family } from '../../stats/index.ts';

export type LimitKind = 'trial' | 'frozen' | 'standard';

export interface PanelSpec {
  readonly role: 'location' | 'dispersion';
  /** What the panel plots, with its unit where it has one, e.g. "Individual value (mL)". */
  readonly label: string;
  readonly values: readonly (number | null)[];
  readonly limits: readonly (Limits | null)[];
  /** Draw the ±1σ and ±2σ zones (variables location panels, where the zone rules apply). */
  readonly zones: boolean;
  /** One marker per flagged point: the first rule (in rule-table order) that flagged it. */
  readonly markers: readonly { readonly index: number; readonly rule: string }[];
  /** Decimals for this panel's limit labels. */
  readonly decimals: number;
  /** The plotted statistic is a whole count (np, c): axis ticks stay on whole numbers. */
  readonly counts: boolean;
  /** A 90 % range around each trial limit, from the limits' own sampling error; null where none is drawn. */
  readonly limitRanges: readonly ({ readonly ucl: readonly [number, number]; readonly lcl: readonly [number, number] } | null)[];
}

/** An estimated change of level within a baseline. */
export interface ShiftSpec {
  readonly start: number;
  readonly end: number;
  readonly at: number;
  readonly interval: readonly [number, number];
  readonly before: number;
  readonly after: number;
}

export interface BaselineSpan {
  readonly start: number;
  readonly end: number;
  readonly kind: LimitKind;
  /** The ledger reason that opened the baseline; absent for the first. */
  readonly reason?: string;
}

export interface ChartSpec {
  readonly id: string;
  readonly title: string;
  readonly subtitle: string;
  readonly dates: readonly IsoDate[];
  readonly labels: readonly string[];
  readonly baselines: readonly BaselineSpan[];
  readonly excluded: readonly number[];
  /** Process changes recorded in the ledger (`change` entries), at the point where they took effect. */
  readonly changes: readonly { readonly index: number; readonly reason: string }[];
  /** First and last index inside the review period, or null when no point falls in it. */
  readonly period: { readonly first: number; readonly last: number } | null;
  readonly panels: readonly PanelSpec[];
  readonly shift: ShiftSpec | null;
  readonly desc: string;
}

const BETTER_WORDS = { higher: 'higher is better', lower: 'lower is better', target: 'on target is better' } as const;

const RULE_ORDER = new Map(RULES.map((r, i) => [r.id, i]));

function markersOf(signals: readonly Signal[]): { index: number; rule: string }[] {
  const best = new Map<number, string>();
  for (const s of signals) {
    for (const i of s.flagged) {
      const current = best.get(i);
      if (current === undefined || RULE_ORDER.get(s.rule)! < RULE_ORDER.get(current)!) best.set(i, s.rule);
    }
  }
  return [...best.entries()].sort((a, b) => a[0] - b[0]).map(([index, r]) => ({ index, rule: r }));
}

function spread(values: readonly (number | null)[], limits: readonly (Limits | null)[]): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) if (v !== null) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
  for (const l of limits) if (l) (lo = Math.min(lo, l.lcl)), (hi = Math.max(hi, l.ucl));
  return Number.isFinite(hi - lo) && hi > lo ? hi - lo : Math.abs(hi) || 1;
}

/** Decimals that resolve about a thousandth of the panel's spread. */
export function labelDecimals(values: readonly (number | null)[], limits: readonly (Limits | null)[]): number {
  return Math.max(0, Math.min(6, Math.ceil(-Math.log10(spread(values, limits) / 200))));
}

/** 90 % ranges (±1.645 standard errors) around the current baseline's limits while they are trial limits. */
function limitRanges(a: Assessed): PanelSpec['limitRanges'] {
  const current = a.baselines[a.baselines.length - 1]!;
  const u = a.evidence.uncertainty;
  const out: ({ ucl: [number, number]; lcl: [number, number] } | null)[] = a.samples.map(() => null);
  if (!u || current.status !== 'trial') return out;
  // Where the limits and their errors repeat (most charts, and a long series's every point), so does the range: one object, shared.
  let previous: { l: unknown; su: number; sl: number; range: NonNullable<(typeof out)[number]> } | undefined;
  for (let i = current.start; i < current.end; i++) {
    const l = a.location.limits[i];
    const su = u.uclSE[i - current.start];
    const sl = u.lclSE[i - current.start];
    if (!l || su === undefined || sl === undefined) continue;
    if (previous?.l !== l || previous.su !== su || previous.sl !== sl) {
      previous = { l, su, sl, range: { ucl: [l.ucl - 1.645 * su, l.ucl + 1.645 * su], lcl: [l.lcl - 1.645 * sl, l.lcl + 1.645 * sl] } };
    }
    out[i] = previous.range;
  }
  return out;
}

const withUnit = (what: string, unit: string) => (unit ? `${what} (${unit})` : what);
/** Attribute charts whose plotted statistic carries the characteristic's unit: rates and gaps. */
const UNIT_CHARTS: ReadonlySet<string> = new Set(['u', 'laney-u', 'g']);

export function chartSpec(a: Assessed, period: { readonly from: IsoDate; readonly to: IsoDate }): ChartSpec {
  const ch = a.characteristic;
  const fam = family(ch.chart);
  const n = a.samples.length;
  const kindOf = (b: Assessed['baselines'][number]): LimitKind => (b.source === 'standard' ? 'standard' : b.status);
  const baselines = a.baselines.map((b) => ({ start: b.start, end: b.end, kind: kindOf(b), ...(b.opened ? { reason: printable(b.opened.reason) } : {}) }));
  const inPeriod = a.samples.map((s, i) => (s.date >= period.from && s.date <= period.to ? i : -1)).filter((i) => i >= 0);
  const capital = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
  const attributes = fam.standardKind === 'attributes';
  const panels: PanelSpec[] = [
    {
      role: 'location',
      label: withUnit(ch.per !== undefined && fam.observation === 'rate' ? 'Rate' : capital(fam.statisticLabel), attributes && !UNIT_CHARTS.has(ch.chart) ? '' : ch.unit),
      values: a.location.values,
      limits: a.location.limits,
      zones: !attributes,
      markers: markersOf(a.location.signals),
      decimals: labelDecimals(a.location.values, a.location.limits),
      counts: ch.chart === 'np' || ch.chart === 'c',
      limitRanges: limitRanges(a),
    },
  ];
  if (a.dispersion && fam.dispersionLabel) {
    panels.push({
      role: 'dispersion',
      label: withUnit(fam.dispersionLabel, ch.unit),
      values: a.dispersion.values,
      limits: a.dispersion.limits,
      zones: false,
      markers: markersOf(a.dispersion.signals),
      decimals: labelDecimals(a.dispersion.values, a.dispersion.limits),
      counts: false,
      limitRanges: [],
    });
  }

  const current = a.baselines[a.baselines.length - 1]!;
  const last = a.location.limits[n - 1] ?? null;
  const d = panels[0]!.decimals;
  const limitsText = last
    ? `Current limits (${kindOf(current)}): center ${fmt(last.center, d)}, upper ${fmt(last.ucl, d)}, lower ${fmt(last.lcl, d)}.`
    : 'No limits yet: the baseline is still collecting points.';
  const flagged = panels.flatMap((p) => p.markers);
  const rulesSeen = [...new Set(flagged.map((m) => m.rule))].map((id) => rule(id)?.short ?? id);
  const signalText = flagged.length
    ? `${flagged.length} flagged point${flagged.length === 1 ? '' : 's'} (${rulesSeen.join(', ')}).`
    : 'No flagged points.';
  const range = n ? `${n} points from ${a.samples[0]!.date} to ${a.samples[n - 1]!.date}` : 'no points';
  const desc = `${fam.label} chart of ${ch.name}: ${range}. ${limitsText} ${signalText} Recommendation: ${a.recommendation.action}.`;

  return {
    id: ch.id,
    title: printable(ch.name),
    subtitle: printable([`${fam.label} chart`, ch.unit, BETTER_WORDS[ch.better]].filter(Boolean).join(' · ')),
    dates: a.samples.map((s) => s.date),
    labels: a.samples.map((s) => s.label),
    baselines,
    excluded: [...a.ledger.excluded.keys()].sort((x, y) => x - y),
    changes: a.ledger.changes.map((c) => ({ index: c.index, reason: printable(c.entry.reason) })).sort((x, y) => x.index - y.index),
    period: inPeriod.length ? { first: inPeriod[0]!, last: inPeriod[inPeriod.length - 1]! } : null,
    panels,
    shift: a.evidence.changePoint
      ? {
          start: current.start,
          end: current.end,
          at: a.evidence.changePoint.index,
          interval: a.evidence.changePoint.interval,
          before: a.evidence.changePoint.before,
          after: a.evidence.changePoint.after,
        }
      : null,
    desc: printable(desc),
  };
}

