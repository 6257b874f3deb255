/**
 * summary.json: the machine-readable result of a build (contract in
 * DESIGN.md, "Outputs"). Pure: built from the assessments alone.
 */
import type { Assessed, Assessment } from './analyse.ts';
import type { Diagnostic } from './diagnostics.ts';
import type { IsoDate, LedgerEntry, ReviewConfig } from './model.ts';
import type { Signal } from './signals/evaluate.ts';
import type { Action } from './review/recommend.ts';
import { family } from './stats/index.ts';
import { rawExposure } from './review/rates.ts';
import { TOOL } from './version.ts';
import type { Integrity } from './review/ledger-chain.ts';
import { LazyList, type Serialized } from './lazy-list.ts';

export const SUMMARY_FORMAT = 1 as const;

/** The counts behind a point's plotted value. */
interface PointCounts {
  n?: number;
  defectives?: number;
  inspected?: number;
  count?: number;
  exposure?: number;
}

function sizeOf(a: Assessed, i: number): PointCounts {
  const o = a.samples[i]!.observation;
  switch (o.kind) {
    case 'measurements':
      return o.values.length > 1 || a.characteristic.chart !== 'individuals' ? { n: o.values.length } : {};
    case 'proportion':
      return { defectives: o.defectives, inspected: o.inspected };
    case 'count':
      return { count: o.count };
    case 'rate':
      // The reader divided exposure by `per`; report it as the data gave it.
      return { count: o.count, exposure: rawExposure(o.exposure, a.characteristic.per ?? 1) };
    case 'gap':
      return {};
    case 'interval':
      return {};
  }
}

function signalJson(a: Assessed, s: Signal) {
  const label = (i: number) => a.samples[i]!.label;
  return {
    rule: s.rule,
    panel: s.panel,
    baseline: s.baseline,
    side: s.side,
    points: s.points.map(label),
    flagged: s.flagged.map(label),
    persistence: s.persistence,
    explained: s.explained,
  };
}

const NONE: readonly string[] = [];

/**
 * For each point, the rules that flagged it (each once, sorted). Built in
 * one pass over the signals: asking every signal about every point was
 * quadratic, and a million-point series with its signals took minutes.
 */
function flaggedBy(signals: readonly Signal[]): (i: number) => readonly string[] {
  const byPoint = new Map<number, string[]>();
  for (const s of signals) {
    for (const i of s.flagged) {
      const rules = byPoint.get(i);
      if (!rules) byPoint.set(i, [s.rule]);
      else if (!rules.includes(s.rule)) rules.push(s.rule);
    }
  }
  for (const rules of byPoint.values()) rules.sort();
  return (i) => byPoint.get(i) ?? NONE;
}

function diagnosticJson(d: Diagnostic) {
  return { severity: d.severity, ruleId: d.ruleId, file: d.file, line: d.line ?? null, column: d.column ?? null, message: d.message };
}

function assessedJson(a: Assessed, period: ReviewConfig['period']) {
  const ch = a.characteristic;
  const fam = family(ch.chart);
  const label = (i: number) => a.samples[i]!.label;
  const locationFlags = flaggedBy(a.location.signals);
  // Made as they are written (see LazyList): a long series' points are most of the summary.
  const points = new LazyList(a.samples.length, (i) => {
    const s = a.samples[i]!;
    const l = a.location.limits[i] ?? null;
    return {
      label: s.label,
      date: s.date,
      value: a.location.values[i]!,
      center: l?.center ?? null,
      ucl: l?.ucl ?? null,
      lcl: l?.lcl ?? null,
      sigma: l?.sigma ?? null,
      excluded: a.ledger.excluded.has(i),
      signals: locationFlags(i),
      baseline: a.baselineOf[i]!,
      inPeriod: s.date >= period.from && s.date <= period.to,
      ...sizeOf(a, i),
    };
  });
  const dispersionFlags = flaggedBy(a.dispersion?.signals ?? []);
  const dispersion = a.dispersion
    ? {
        statistic: fam.dispersionLabel,
        points: new LazyList(a.samples.length, (i) => {
          const s = a.samples[i]!;
          const l = a.dispersion!.limits[i] ?? null;
          return {
            label: s.label,
            date: s.date,
            value: a.dispersion!.values[i] ?? null,
            center: l?.center ?? null,
            ucl: l?.ucl ?? null,
            lcl: l?.lcl ?? null,
            signals: dispersionFlags(i),
          };
        }),
        signals: a.dispersion.signals.map((s) => signalJson(a, s)),
      }
    : null;
  return {
    id: ch.id,
    name: ch.name,
    chart: ch.chart,
    unit: ch.unit,
    better: ch.better,
    safety: ch.safety,
    tags: ch.tags,
    spec: ch.spec ?? null,
    status: 'assessed' as const,
    statistic: fam.statisticLabel,
    points,
    dispersion,
    baselines: a.baselines.map((b) => ({
      // A baseline with no points yet (a data file with a header only) has no first label.
      start: b.end > b.start ? label(b.start) : null,
      end: b.end > b.start ? label(b.end - 1) : null,
      status: b.status,
      source: b.source,
      basis: b.basis.map(label),
      usable: b.usable,
      frozenAt: b.frozenBy?.point ?? null,
      reason: b.opened?.reason ?? null,
      estimate: b.limits?.estimate ?? null,
    })),
    signals: a.location.signals.map((s) => signalJson(a, s)),
    recommendation: {
      action: a.recommendation.action,
      reasons: a.recommendation.reasons,
      ledger: a.recommendation.ledger,
      changePoint: a.recommendation.changePoint === undefined ? null : label(a.recommendation.changePoint),
    },
    changePoint: changePointJson(a),
    evidence: evidenceJson(a),
    history: a.ledger.history.map(historyJson),
    capability: capabilityJson(a),
    per: ch.per ?? null,
    chartChoice: ch.chosen ?? null,
    notes: a.notes.lines,
    overdispersion: a.dispersionCheck,
    rates: ratesJson(a, period),
    diagnostics: a.diagnostics.map(diagnosticJson),
  };
}

function capabilityJson(a: Assessed) {
  const c = a.capability;
  if (!c) return null;
  if (c.status === 'withheld') return { status: c.status, reason: c.reason };
  const f = c.figures;
  return {
    status: c.status,
    points: c.points,
    values: f.values,
    mean: f.mean,
    sigmaWithin: f.sigmaWithin,
    sigmaOverall: f.sigmaOverall,
    cp: f.cp,
    cpk: f.cpk,
    pp: f.pp,
    ppk: f.ppk,
    ppm: { within: f.ppmWithin, overall: f.ppmOverall },
    normality: c.normality,
    notes: c.notes,
  };
}

/** The baseline's rate and each review-period point's, with exact intervals. */
function ratesJson(a: Assessed, period: ReviewConfig['period']) {
  const r = a.rates;
  if (!r) return null;
  return {
    per: r.per,
    level: 0.95,
    baseline: r.baseline,
    points: a.samples
      .map((s, i) => ({ s, i }))
      .filter(({ s }) => s.date >= period.from && s.date <= period.to)
      .map(({ s, i }) => ({ label: s.label, ...r.points[i]! })),
  };
}

function historyJson(e: LedgerEntry) {
  return { line: e.line, date: e.date, action: e.action, point: e.point, reason: e.reason, by: e.by };
}

function changePointJson(a: Assessed) {
  const c = a.evidence.changePoint;
  if (!c) return null;
  const label = (i: number) => a.samples[i]!.label;
  return {
    label: label(c.index),
    interval: [label(c.interval[0]), label(c.interval[1])],
    method: c.method,
    significance: c.significance,
    permutations: c.permutations,
    plannedPermutations: c.planned,
    likelihoodRatio: c.lr,
    before: c.before,
    after: c.after,
  };
}

function evidenceJson(a: Assessed) {
  const e = a.evidence;
  const label = (i: number) => a.samples[i]!.label;
  const current = a.baselines[a.baselines.length - 1]!;
  return {
    changeTests: e.changeTests.map((t) => ({
      change: label(t.index),
      ledgerLine: t.entry.line,
      method: t.comparison.method,
      before: t.comparison.before,
      after: t.comparison.after,
      periodsBefore: t.comparison.periodsBefore,
      periodsAfter: t.comparison.periodsAfter,
      effect: t.comparison.effect,
      p: t.comparison.p,
      significant: t.significant,
      better: t.better,
      morePeriods: t.comparison.morePeriods,
    })),
    exclusions: e.exclusions.map((x) => ({ point: label(x.index), ledgerLine: x.entry.line, effect: x.effect, moves: x.moves })),
    limitUncertainty: e.uncertainty
      ? {
          points: e.uncertainty.points,
          uclSE: e.uncertainty.uclSE[current.end - 1 - current.start] ?? null,
          lclSE: e.uncertainty.lclSE[current.end - 1 - current.start] ?? null,
          sigmaCV: e.uncertainty.sigmaCV ?? null,
          enoughPoints: e.uncertainty.enoughPoints ?? null,
        }
      : null,
    falseAlarm: e.falseAlarm,
    refresh: e.refresh,
  };
}

/** A characteristic's item of summary.json. */
export function characteristicJson(a: Assessment, period: ReviewConfig['period']) {
  return a.status === 'assessed'
    ? assessedJson(a, period)
    : {
        id: a.characteristic.id,
        name: a.characteristic.name,
        chart: a.characteristic.chart,
        unit: a.characteristic.unit,
        better: a.characteristic.better,
        safety: a.characteristic.safety,
        tags: a.characteristic.tags,
        spec: a.characteristic.spec ?? null,
        status: 'not-assessed' as const,
        points: [],
        dispersion: null,
        baselines: [],
        signals: [],
        recommendation: null,
        changePoint: null,
        evidence: null,
        history: a.history.map(historyJson),
        capability: null,
        per: a.characteristic.per ?? null,
        chartChoice: a.characteristic.chosen ?? null,
        notes: [],
        overdispersion: null,
        rates: null,
        diagnostics: a.diagnostics.map(diagnosticJson),
      };
}

export type CharacteristicJson = ReturnType<typeof characteristicJson>;

/** What the counts of summary.json read of a characteristic (a Brief has them). */
export interface Counted {
  readonly status: Assessment['status'];
  readonly action: Action | null;
  readonly falseAlarm: number | null;
}

/**
 * summary.json, with `characteristics` as given (each characteristic's
 * item, in order: `characteristicJson`'s, or what a build writes in its
 * place) and the counts made from `counted`, one for each.
 */
export function buildSummary<C = CharacteristicJson>(
  config: ReviewConfig,
  counted: readonly Counted[],
  characteristics: readonly C[],
  global: readonly Diagnostic[],
  asOf: IsoDate,
  integrity?: Integrity,
) {
  const actions: Record<string, number> = { keep: 0, freeze: 0, 're-baseline': 0, investigate: 0 };
  let expectedFalseAlarms = 0;
  for (const a of counted) {
    if (a.status !== 'assessed') continue;
    actions[a.action!]!++;
    expectedFalseAlarms += a.falseAlarm ?? 0;
  }
  return {
    format: SUMMARY_FORMAT,
    tool: TOOL,
    title: config.title,
    organisation: config.organisation,
    period: config.period,
    asOf,
    rules: config.rules,
    minPoints: config.minPoints,
    freezeAfter: config.freezeAfter,
    counts: {
      characteristics: counted.length,
      assessed: counted.filter((a) => a.status === 'assessed').length,
      notAssessed: counted.filter((a) => a.status !== 'assessed').length,
      actions,
      /** Characteristics expected to signal in the period from noise alone, were every one stable. */
      expectedFalseAlarms,
    },
    characteristics,
    integrity: integrity
      ? {
          ledgerRows: integrity.chain.rows,
          ledgerHead: integrity.chain.head,
          rewritten: integrity.rewrite
            ? { comparedWith: integrity.rewrite.comparedWith, row: integrity.rewrite.row, previousRows: integrity.rewrite.previousRows, currentRows: integrity.rewrite.currentRows }
            : null,
        }
      : null,
    diagnostics: global.map(diagnosticJson),
  };
}

/** summary.json of assessments made here (a build takes the counts from the briefs, and may write items it kept). */
export function summaryOf(config: ReviewConfig, assessments: readonly Assessment[], global: readonly Diagnostic[], asOf: IsoDate, integrity?: Integrity) {
  const counted = assessments.map((a): Counted =>
    a.status === 'assessed' ? { status: a.status, action: a.recommendation.action, falseAlarm: a.evidence.falseAlarm?.probability ?? null } : { status: a.status, action: null, falseAlarm: null },
  );
  return buildSummary(config, counted, assessments.map((a) => characteristicJson(a, config.period)), global, asOf, integrity);
}

/** summary.json as a reader parses it (buildSummary's point lists are made as they are written). */
export type Summary = Serialized<ReturnType<typeof buildSummary<CharacteristicJson>>>;
