/**
 * Everything plumbline concludes about one characteristic, from its samples
 * and ledger entries: baselines and limits per point, signals on each panel,
 * and the recommendation. Pure: no files, no clock.
 */
import { type Diagnostic, hasErrors, info } from './diagnostics.ts';
import { fmt } from './format.ts';
import { type CapabilityReport, capabilityReport } from './review/capability.ts';
import { type ChartNotes, chartNotes } from './review/notes.ts';
import { type RateReport, rateReport } from './review/rates.ts';
import { type RunSide, medianSide } from './signals/median-line.ts';
import { type DispersionCheck, checkDispersion } from './stats/overdispersion.ts';
import type { Characteristic, IsoDate, LedgerEntry, ReviewConfig, Sample } from './model.ts';
import { type Baseline, buildBaselines } from './limits/baselines.ts';
import { type LedgerState, replayLedger } from './limits/ledger-state.ts';
import { type Evidence, gatherEvidence } from './review/evidence.ts';
import { type Recommendation, recommend } from './review/recommend.ts';
import { type Signal, evaluatePanel } from './signals/evaluate.ts';
import { rule, rulesFor } from './signals/rule-sets.ts';
import { type CountModel, type Limits, family } from './stats/index.ts';

export interface PanelResult {
  readonly values: readonly (number | null)[];
  readonly limits: readonly (Limits | null)[];
  readonly signals: readonly Signal[];
}

export interface Assessed {
  readonly status: 'assessed';
  readonly characteristic: Characteristic;
  readonly samples: readonly Sample[];
  /** Baseline index per sample. */
  readonly baselineOf: readonly number[];
  readonly baselines: readonly Baseline[];
  readonly ledger: LedgerState;
  readonly location: PanelResult;
  readonly dispersion?: PanelResult;
  readonly recommendation: Recommendation;
  readonly evidence: Evidence;
  /** Attribute charts: do the data vary more than the binomial or Poisson model allows? */
  readonly dispersionCheck: DispersionCheck | null;
  /** Variables charts with a specification; null where capability does not apply. */
  readonly capability: CapabilityReport | null;
  /** Rate charts: each point's and the baseline's rate with exact intervals. */
  readonly rates: RateReport | null;
  /** What a reader of this chart needs to know about how it was drawn and judged. */
  readonly notes: ChartNotes;
  readonly diagnostics: readonly Diagnostic[];
}

export interface NotAssessed {
  readonly status: 'not-assessed';
  readonly characteristic: Characteristic;
  readonly diagnostics: readonly Diagnostic[];
  readonly history: readonly LedgerEntry[];
}

export type Assessment = Assessed | NotAssessed;

export interface AnalyseInput {
  readonly config: ReviewConfig;
  readonly characteristic: Characteristic;
  /** Samples through the end of the review period, in order. */
  readonly samples: readonly Sample[];
  /** Labels of points after the review period, so ledger entries naming them are recognised. */
  readonly laterLabels: ReadonlySet<string>;
  readonly ledger: readonly LedgerEntry[];
  readonly ledgerFile: string;
  /** Diagnostics already found reading this characteristic's data. */
  readonly diagnostics: readonly Diagnostic[];
  readonly asOf: IsoDate;
}

/**
 * The statistics and signals of one characteristic: the ledger replayed,
 * baselines and limits per point, and the rules' signals on each panel.
 * `analyse` goes on from here to the evidence and the recommendation; the
 * benchmark times this stage on its own as well.
 */
export interface Panels {
  readonly status: 'charted';
  readonly replay: ReturnType<typeof replayLedger>;
  readonly family: ReturnType<typeof family>;
  readonly baselines: readonly Baseline[];
  readonly baselineOf: readonly number[];
  readonly location: PanelResult & { readonly values: readonly number[] };
  readonly dispersion?: PanelResult;
  /** Per point, the median line its same-side runs are judged against (small counts), if any. */
  readonly runSides: readonly (RunSide | undefined)[];
  readonly panelKind: 'variables' | 'attributes';
  readonly diagnostics: Diagnostic[];
}

export function computePanels(input: AnalyseInput): Panels | NotAssessed {
  const { config, characteristic: ch, samples } = input;
  const diagnostics: Diagnostic[] = [...input.diagnostics];
  const replay = replayLedger(input.ledgerFile, ch.id, samples, input.ledger, input.laterLabels);
  diagnostics.push(...replay.diagnostics);
  if (hasErrors(diagnostics)) return { status: 'not-assessed', characteristic: ch, diagnostics, history: replay.state.history };

  const fam = family(ch.chart);
  const built = buildBaselines(fam, samples, replay.state, {
    minPoints: config.minPoints,
    standard: ch.standard,
    ledgerFile: input.ledgerFile,
    characteristic: ch.id,
  });
  diagnostics.push(...built.diagnostics);
  if (hasErrors(diagnostics)) return { status: 'not-assessed', characteristic: ch, diagnostics, history: replay.state.history };

  const { baselines } = built;
  const baselineOf: number[] = [];
  const locLimits: (Limits | null)[] = [];
  const dispLimits: (Limits | null)[] = [];
  baselines.forEach((b, k) => {
    for (let i = b.start; i < b.end; i++) {
      baselineOf.push(k);
      locLimits.push(b.limits?.location[i - b.start] ?? null);
      dispLimits.push(b.limits?.dispersion?.[i - b.start] ?? null);
    }
  });

  // The dispersion panel is computed per baseline so that the first moving
  // range of a baseline does not reach back into the previous one.
  const locValues: number[] = [];
  const dispValues: (number | null)[] = [];
  for (const b of baselines) {
    const v = fam.values(samples.slice(b.start, b.end));
    // Appended one by one: spreading a million values into push overflows the call stack.
    for (const x of v.location) locValues.push(x);
    if (v.dispersion) for (const x of v.dispersion) dispValues.push(x);
  }

  const explained = (i: number) => replay.state.excluded.has(i) || replay.state.reviewed.has(i);
  // A moving range spans a point and the one before it, so a cause found for
  // either explains it; ranges and SDs of subgroups belong to their own point.
  const dispersionExplained = ch.chart === 'individuals' ? (i: number) => explained(i) || (i > 0 && explained(i - 1)) : explained;
  const panelKind = fam.standardKind === 'variables' ? 'variables' : 'attributes';
  // Small, skewed counts: same-side runs are judged against each point's median (src/signals/median-line.ts).
  const runModel = fam.runModel?.bind(fam);
  // Frozen limits repeat the same distribution point after point; place each (count, distribution) once.
  const placed = new Map<string, RunSide>();
  const place = (m: CountModel) => {
    const key = JSON.stringify(m);
    let r = placed.get(key);
    if (!r) placed.set(key, (r = medianSide(m)));
    return r;
  };
  const runSides = runModel
    ? samples.map((s, i) => {
        const l = locLimits[i];
        const est = baselines[baselineOf[i]!]?.limits?.estimate;
        const m = l && est ? runModel(s, l, est) : undefined;
        return m ? place(m) : undefined;
      })
    : [];
  const locSignals = evaluatePanel(
    'location',
    { values: locValues, limits: locLimits, ...(runModel ? { runSide: (i: number) => runSides[i] } : {}) },
    baselines,
    rulesFor(config.rules, panelKind),
    explained,
  );
  const location = { values: locValues, limits: locLimits, signals: locSignals };
  const dispersion: PanelResult | undefined = fam.dispersionLabel
    ? {
        values: dispValues,
        limits: dispLimits,
        signals: evaluatePanel('dispersion', { values: dispValues, limits: dispLimits }, baselines, rulesFor(config.rules, 'dispersion'), dispersionExplained),
      }
    : undefined;
  return { status: 'charted', replay, family: fam, baselines, baselineOf, location, ...(dispersion ? { dispersion } : {}), runSides, panelKind, diagnostics };
}

export function analyse(input: AnalyseInput): Assessment {
  const panels = computePanels(input);
  if (panels.status === 'not-assessed') return panels;
  const { config, characteristic: ch, samples } = input;
  const { replay, family: fam, baselines, baselineOf, location, dispersion, runSides, panelKind, diagnostics } = panels;
  const locValues = location.values;
  const locLimits = location.limits;
  const locSignals = location.signals;

  const period = config.period;
  // A one-time refresh is offered once a frozen baseline has 100 individual values or 25 subgroups (REFERENCE §4).
  const refreshAfter = ch.chart === 'individuals' ? 100 : 25;
  const evidence = gatherEvidence({
    family: fam,
    samples,
    baselines,
    ledger: replay.state,
    locationValues: locValues,
    signals: locSignals,
    better: ch.better,
    inPeriod: (i) => samples[i]!.date >= period.from && samples[i]!.date <= period.to,
    rules: rulesFor(config.rules, panelKind),
    refreshAfter,
  });

  const current = baselines[baselines.length - 1]!;
  const usable: number[] = [];
  for (let i = current.start; i < current.end; i++) if (!replay.state.excluded.has(i)) usable.push(i);
  const label = (i: number) => samples[i]!.label;

  // Over the points the current limits rest on, against the ordinary model.
  const ordinary = fam.id === 'p' || fam.id === 'np' || fam.id === 'c' || fam.id === 'u';
  const checkBasis = current.source === 'data' ? current.basis : usable;
  const dispersionCheck =
    ordinary && current.limits
      ? checkDispersion(checkBasis.map((i) => { const l = locLimits[i]!; return l.sigma > 0 ? (locValues[i]! - l.center) / l.sigma : 0; }))
      : null;
  const recommendation = recommend({
    characteristic: ch.id,
    better: ch.better,
    samples,
    baselines,
    signals: [...locSignals, ...(dispersion?.signals ?? [])],
    changes: replay.state.changes,
    period: config.period,
    minPoints: config.minPoints,
    freezeAfter: config.freezeAfter,
    asOf: input.asOf,
    refreshAfter,
    describeRule: (id) => rule(id)?.description ?? id,
    evidence,
    ...(dispersionCheck?.recommend
      ? { advice: [`Many signals on this chart may be ordinary variation between periods: the points vary far more than the ${fam.observation === 'proportion' ? 'binomial' : 'Poisson'} model allows (σz = ${fmt(dispersionCheck.sigmaZ, 2)}; see the chart notes). Consider chart: ${fam.observation === 'proportion' ? 'laney-p' : 'laney-u'} before investigating each one.`] }
      : {}),
  });

  const capability = capabilityReport({
    characteristic: ch,
    family: fam,
    samples,
    current,
    usable,
    signals: [...locSignals, ...(dispersion?.signals ?? [])],
    baselineIndex: baselines.length - 1,
    label,
  });
  const rates = fam.observation === 'rate' && current.limits ? rateReport(samples, current, usable, ch.per ?? 1) : null;
  const notes = chartNotes({
    characteristic: ch,
    family: fam,
    current,
    latest: current.end > current.start ? (locLimits[current.end - 1] ?? null) : null,
    latestSample: current.end > current.start ? samples[current.end - 1] : undefined,
    medianRuns: runSides.some((r, i) => r !== undefined && i >= current.start),
    dispersionCheck,
  });
  if (notes.lowCounts) diagnostics.push(info('chart/low-counts', { file: ch.data, characteristic: ch.id }, notes.lowCounts));

  return {
    status: 'assessed',
    characteristic: ch,
    samples,
    baselineOf,
    baselines,
    ledger: replay.state,
    location,
    ...(dispersion ? { dispersion } : {}),
    recommendation,
    evidence,
    dispersionCheck,
    capability,
    rates,
    notes,
    diagnostics,
  };
}
