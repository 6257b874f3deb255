/**
 * A characteristic in brief: what the pack says of it outside its own
 * section and its item of summary.json — its row of the overview, its
 * decision, its part of the counts and of the cautions, its comparison
 * record and its diagnostics. A function of the assessment and the review
 * settings alone (no template reads it), so the build cache keeps it beside
 * the assessment, and a rebuild reads back only the assessments it must
 * make a section or a chart from: a plant's 999 unchanged assessments took
 * 0.5 s to read back, and as much again to collect as garbage. Pure.
 */
import type { Assessed, Assessment } from '../analyse.ts';
import type { Diagnostic } from '../diagnostics.ts';
import { plural, pct } from '../format.ts';
import type { ChartId, ReviewConfig } from '../model.ts';
import type { Action } from '../review/recommend.ts';
import { type RecordItem, recordItem } from '../review/since.ts';
import type { Signal } from '../signals/evaluate.ts';
import { type CharacteristicJson, characteristicJson } from '../summary.ts';
import { keyFigure } from './figures.ts';

export interface Brief {
  readonly id: string;
  readonly name: string;
  readonly chart: ChartId;
  readonly status: Assessment['status'];
  /** The recommended action; null when the characteristic could not be assessed. */
  readonly action: Action | null;
  /** The action in words, as the pack prints it ("keep collecting points", "cannot be assessed"). */
  readonly actionWords: string;
  readonly reasons: readonly string[];
  /** Ledger lines to append once the decision is taken. */
  readonly ledger: readonly string[];
  /** Its row of the overview, after the name: chart, limits, points and signals in the period, noise alone, key figure, action. */
  readonly overview: readonly string[];
  /** The chance of a signal in the period from noise alone; null where it is not known. */
  readonly falseAlarm: number | null;
  /** Safety-related or incident-count (the cautions section lists it), with what the chart cautions read of it; null otherwise. */
  readonly cautions: { readonly perRate: boolean; readonly lowCounts: boolean } | null;
  /** Points charted (0 when not assessed): very long series are not cached. */
  readonly points: number;
  readonly record: RecordItem;
  readonly diagnostics: readonly Diagnostic[];
}

const ACTION_WORDS = {
  keep: 'keep the limits',
  freeze: 'freeze the trial limits',
  're-baseline': 're-baseline',
  investigate: 'investigate',
} as const;

/** The action in words; "keep" while a baseline is still collecting means keep collecting points. */
export function actionWords(a: Assessed): string {
  const b = a.baselines[a.baselines.length - 1]!;
  return a.recommendation.action === 'keep' && !b.limits ? 'keep collecting points' : ACTION_WORDS[a.recommendation.action];
}

/** Safety-related or incident-count characteristics bring the cautions section (DESIGN.md, "Cautions"). */
export function needsCautions(a: Assessment): boolean {
  const c = a.characteristic;
  return c.safety || c.tags.some((t) => t === 'incident' || t === 'incidents');
}

function limitStatus(a: Assessment): string {
  if (a.status !== 'assessed') return 'cannot be assessed';
  const b = a.baselines[a.baselines.length - 1]!;
  if (b.source === 'standard') return 'standard values';
  if (!b.limits) return 'collecting';
  return b.status;
}

export function periodIndices(a: Assessed, config: ReviewConfig): number[] {
  return a.samples.map((s, i) => (s.date >= config.period.from && s.date <= config.period.to ? i : -1)).filter((i) => i >= 0);
}

function signalsInPeriod(a: Assessed, inPeriod: ReadonlySet<number>): Signal[] {
  return [...a.location.signals, ...(a.dispersion?.signals ?? [])].filter((s) => s.flagged.some((i) => inPeriod.has(i)));
}

function overviewRow(a: Assessment, config: ReviewConfig): string[] {
  const c = a.characteristic;
  if (a.status !== 'assessed') return [c.chart, limitStatus(a), '–', '–', '–', '–', 'cannot be assessed'];
  const inPeriod = new Set(periodIndices(a, config));
  const inPeriodSignals = signalsInPeriod(a, inPeriod);
  const flagged = new Set(inPeriodSignals.flatMap((s) => s.flagged.filter((i) => inPeriod.has(i))));
  const open = new Set(inPeriodSignals.filter((s) => !s.explained).flatMap((s) => s.flagged.filter((i) => inPeriod.has(i))));
  const signals = flagged.size === 0 ? 'none' : `${plural(flagged.size, 'point')} flagged${open.size === 0 ? ', all explained' : open.size < flagged.size ? `, ${open.size} unexplained` : ''}`;
  const noise = a.evidence.falseAlarm ? pct(a.evidence.falseAlarm.probability, 0) : '–';
  return [c.chart, limitStatus(a), String(inPeriod.size), signals, noise, keyFigure(a), actionWords(a)];
}

/** The brief of an assessment, whose item of summary.json is `json` (the comparison record is cut from it). */
export function briefOf(a: Assessment, config: ReviewConfig, json: CharacteristicJson): Brief {
  const c = a.characteristic;
  const assessed = a.status === 'assessed';
  return {
    id: c.id,
    name: c.name,
    chart: c.chart,
    status: a.status,
    action: assessed ? a.recommendation.action : null,
    actionWords: assessed ? actionWords(a) : 'cannot be assessed',
    reasons: assessed ? a.recommendation.reasons : [],
    ledger: assessed ? a.recommendation.ledger : [],
    overview: overviewRow(a, config),
    falseAlarm: assessed ? (a.evidence.falseAlarm?.probability ?? null) : null,
    cautions: needsCautions(a) ? { perRate: c.per !== undefined, lowCounts: assessed && a.notes.lowCounts !== undefined } : null,
    points: assessed ? a.samples.length : 0,
    record: recordItem(json),
    diagnostics: a.diagnostics,
  };
}

/** Assessments as the pack tree takes them (each with its brief), where no build cache is involved. */
export function packItems(assessments: readonly Assessment[], config: ReviewConfig): { brief: Brief; assessment: () => Assessment }[] {
  return assessments.map((a) => ({ brief: briefOf(a, config, characteristicJson(a, config.period)), assessment: () => a }));
}
