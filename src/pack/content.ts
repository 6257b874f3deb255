/**
 * The review pack as one mdast tree, from the assessments and the templates.
 * Markdown and HTML are serialisations of this tree and the PDF is laid out
 * from it, so all three carry the same content in the same order. Pure.
 */
import type { BlockContent, Heading, Root, RootContent } from 'mdast';
import type { Assessed, Assessment } from '../analyse.ts';
import { type Diagnostic, formatDiagnostic, sortDiagnostics } from '../diagnostics.ts';
import { decimalsFor, fmt, fmtAuto, pct, plural } from '../format.ts';
import { confidenceText, describeComparison } from '../review/recommend.ts';
import { CHANGE_CONFIDENCE, type ChangePointEvidence } from '../review/evidence.ts';
import { HISTORY, RUNS } from '../signals/false-alarm.ts';
import type { IsoDate, ReviewConfig } from '../model.ts';
import { labelDecimals } from '../render/scene/spec.ts';
import { RULES, RULE_SETS, rule } from '../signals/rule-sets.ts';
import { constants } from '../stats/constants.ts';
import type { Limits } from '../stats/family.ts';
import { family } from '../stats/index.ts';
import { type Inline, chartImage, code, heading, link, list, paragraph, plain, slug, strong, table } from './mdast.ts';
import { type Templates, fillTemplate } from './template.ts';
import type { SinceReport } from '../review/since.ts';
import { capabilityBlocks, notesBlocks, rateBlocks } from './figures.ts';
import { chartCautionBlocks } from './cautions.ts';
import { type Brief, actionWords, periodIndices } from './brief.ts';
import { type MadeSection, madeOf, sectionNode } from './made-section.ts';

export interface PackInput {
  readonly config: ReviewConfig;
  /** Every characteristic, in order. */
  readonly characteristics: readonly PackItem[];
  /** Problems that belong to no one characteristic. */
  readonly diagnostics: readonly Diagnostic[];
  readonly asOf: IsoDate;
  readonly fingerprint: string;
  readonly tool: { readonly name: string; readonly version: string };
  readonly templates: Templates;
  /** File name of each characteristic's chart, relative to the pack. */
  readonly chartFile: (id: string) => string;
  /** What changed since the previous pack, when one was given or found. */
  readonly since?: SinceReport;
  /** Earlier ledger rows were changed or removed since the previous pack: the sentence that says so. */
  readonly rewritten?: string;
  /** A customer's pack (`build --only tag=NAME`): the tag and the name to print, from review.yaml `customers`. */
  readonly audience?: { readonly tag: string; readonly name: string | null };
}

/** A characteristic as the tree is built from it. */
export interface PackItem {
  readonly brief: Brief;
  /** Its assessment, read back from the build cache only if its section is built here. */
  assessment(): Assessment;
  /**
   * Its section as an earlier build made it: the tree holds it as one node
   * (a part whose pages, Markdown and HTML that build left), unless its
   * headings get other ids here; then it is built again.
   */
  readonly made?: MadeSection;
}

export const sectionId = (characteristicId: string) => `c-${characteristicId}`;

const ESTIMATE_WORDS: Readonly<Record<string, string>> = {
  mean: 'mean',
  grandMean: 'grand mean',
  mrBar: 'mean moving range',
  rBar: 'mean range',
  sBar: 'mean standard deviation',
  sigma: 'sigma',
  pBar: 'mean fraction nonconforming',
  cBar: 'mean count',
  uBar: 'mean count per unit',
  sigmaZ: 'Laney sigma-z',
  gBar: 'mean gap',
  pHat: 'event probability p̂',
  median: 'median gap',
  ucl3Sigma: '3-sigma upper limit (for comparison)',
  meanDays: 'mean days between events',
  yBar: 'mean of t^(1/3.6)',
  mrBarY: 'mean moving range of t^(1/3.6)',
  sigmaY: 'sigma of t^(1/3.6)',
};

function range(values: readonly number[], decimals: number): string {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
  return hi - lo < 10 ** -decimals / 2 ? fmt(lo, decimals) : `${fmt(lo, decimals)} to ${fmt(hi, decimals)}`;
}

function limitsRows(a: Assessed): (readonly Inline[] | string)[][] {
  const label = (i: number) => a.samples[i]!.label;
  const rows: (readonly Inline[] | string)[][] = [];
  const panels: { name: string; limits: readonly (Limits | null)[]; values: readonly (number | null)[] }[] = [
    { name: family(a.characteristic.chart).statisticLabel, limits: a.location.limits, values: a.location.values },
    ...(a.dispersion ? [{ name: family(a.characteristic.chart).dispersionLabel!.toLowerCase(), limits: a.dispersion.limits, values: a.dispersion.values }] : []),
  ];
  a.baselines.forEach((b, k) => {
    const span = b.end > b.start ? `${label(b.start)} – ${label(b.end - 1)}` : '–';
    const status = b.source === 'standard' ? 'standard values' : b.limits ? b.status : 'collecting';
    const basis =
      b.source === 'standard'
        ? 'review.yaml standard values'
        : b.basis.length
          ? `${plural(b.basis.length, 'point')}, ${label(b.basis[0]!)} – ${label(b.basis[b.basis.length - 1]!)}${b.frozenBy ? ` (frozen at ${b.frozenBy.point})` : ''}`
          : 'no usable points yet';
    for (const p of panels) {
      const ls = p.limits.slice(b.start, b.end).filter((l): l is Limits => l !== null);
      const d = labelDecimals(p.values, p.limits);
      rows.push([
        String(k + 1),
        span,
        p.name,
        status,
        basis,
        ls.length ? range(ls.map((l) => l.center), d) : '–',
        ls.length ? range(ls.map((l) => l.lcl), d) : '–',
        ls.length ? range(ls.map((l) => l.ucl), d) : '–',
      ]);
    }
  });
  return rows;
}

function estimatesText(a: Assessed): BlockContent[] {
  const parts = a.baselines.flatMap((b, k) => {
    if (!b.limits) return [];
    const est = Object.entries(b.limits.estimate)
      .sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0))
      .map(([key, v]) => `${ESTIMATE_WORDS[key] ?? key} ${fmt(v, Math.abs(v) < 1 ? 5 : 4)}`);
    return [`baseline ${k + 1}: ${est.join(', ')}`];
  });
  return parts.length ? [paragraph('Estimates behind the limits — ', parts.join('; '), '.')] : [];
}

/**
 * Signals before the period listed in a characteristic's table: the latest
 * ones. A long history signals from noise alone (a million minute readings
 * gave thousands of rows); the rest are counted under the table and listed
 * in summary.json. Every signal in the period is listed.
 */
export const EARLIER_SIGNAL_ROWS = 50;

function signalRows(a: Assessed, inPeriod: ReadonlySet<number>): { rows: (readonly Inline[] | string)[][]; left: BlockContent[] } {
  // A point is named by its label, with its date where the label is something else (a lot or batch id).
  const name = (i: number) => (a.samples[i]!.label === a.samples[i]!.date ? a.samples[i]!.label : `${a.samples[i]!.label} (${a.samples[i]!.date})`);
  const all = [...a.location.signals, ...(a.dispersion?.signals ?? [])].sort((x, y) => x.flagged[0]! - y.flagged[0]! || (x.rule < y.rule ? -1 : 1));
  const earlier = all.filter((s) => !s.flagged.some((i) => inPeriod.has(i)));
  const leftOut = new Set(earlier.slice(0, Math.max(0, earlier.length - EARLIER_SIGNAL_ROWS)));
  const byRule = new Map<string, number>();
  for (const s of leftOut) byRule.set(s.rule, (byRule.get(s.rule) ?? 0) + 1);
  const left: BlockContent[] = leftOut.size
    ? [
        paragraph(
          `Not listed: ${plural(leftOut.size, 'earlier signal')}, before the latest ${EARLIER_SIGNAL_ROWS} (`,
          [...byRule].sort(([x], [y]) => (x < y ? -1 : 1)).map(([r, n]) => `${rule(r)?.short ?? r}: ${n}`).join(', '),
          '); summary.json lists every signal.',
        ),
      ]
    : [];
  const rows = all
    .filter((s) => !leftOut.has(s))
    .map((s) => {
      const first = s.points[0]!;
      const lastFlag = s.flagged[s.flagged.length - 1]!;
      return [
        rule(s.rule)?.description ?? s.rule,
        s.panel === 'location' ? family(a.characteristic.chart).statisticLabel : family(a.characteristic.chart).dispersionLabel!.toLowerCase(),
        first === lastFlag ? name(first) : `${name(first)} – ${name(lastFlag)}, ${plural(s.flagged.length, 'point')} flagged`,
        s.side ?? '–',
        s.persistence,
        s.explained ? 'yes' : 'no',
        s.flagged.some((i) => inPeriod.has(i)) ? 'yes' : 'no',
      ];
    });
  return { rows, left };
}

const num = fmtAuto;

/** "999 seeded reorderings", or for a curtailed test how far it went and why it stopped. */
function reorderingsText(cp: ChangePointEvidence): string {
  if (cp.permutations >= cp.planned) return `${cp.permutations} seeded reorderings`;
  const reached = cp.permutations - Math.round(cp.significance * cp.permutations);
  return `stopped after ${cp.permutations} of ${cp.planned} seeded reorderings: ${reached} had reached the observed statistic, so the confidence could no longer reach ${fmt(CHANGE_CONFIDENCE, 2)}`;
}

function evidenceBlocks(a: Assessed, rulesText: string): RootContent[] {
  const e = a.evidence;
  const label = (i: number) => a.samples[i]!.label;
  const items: Inline[][] = [];
  const cp = e.changePoint;
  if (cp) {
    items.push([
      strong('Estimated change point'),
      `: "${label(cp.index)}", level ${num(cp.before)} → ${num(cp.after)}; plausible from "${label(cp.interval[0])}" to "${label(cp.interval[1])}"; confidence ${confidenceText(cp.significance, cp.permutations)} that the level changed at all (permutation test, ${reorderingsText(cp)}; likelihood ratio ${num(cp.lr)}). The chart shows the levels before and after and the plausible range.`,
    ]);
  }
  for (const t of e.changeTests) {
    const verdict = t.significant
      ? `a significant difference${t.better === true ? ', in the better direction' : t.better === false ? ', in the worse direction' : ''}`
      : t.comparison.morePeriods !== null && t.comparison.morePeriods > 0
        ? `no significant difference yet; if the difference seen is real, about ${plural(t.comparison.morePeriods, 'more period')} would typically show it`
        : 'no significant difference, and one this small would take far more data to show';
    items.push([strong(`Recorded change at "${label(t.index)}"`), ` (ledger line ${t.entry.line}: ${t.entry.reason}): ${describeComparison(t.comparison)} — ${verdict}.`]);
  }
  const u = e.uncertainty;
  const current = a.baselines[a.baselines.length - 1]!;
  if (u) {
    const last = current.end - 1 - current.start;
    const d = labelDecimals(a.location.values, a.location.limits);
    items.push([
      strong('Uncertainty of the limits'),
      `: they rest on ${plural(u.points, a.characteristic.chart === 'xbar-r' || a.characteristic.chart === 'xbar-s' ? 'subgroup' : 'point')}; the upper limit's standard error is ${fmt(u.uclSE[last]!, d + 1)}, so a 90% range for it is ±${fmt(1.645 * u.uclSE[last]!, d + 1)}` +
        (u.sigmaCV !== undefined ? `; the sigma estimate's coefficient of variation is ${pct(u.sigmaCV, 1)}` : '') +
        (u.enoughPoints !== undefined
          ? `. Estimated limits behave like known ones only after about ${u.enoughPoints} ${a.characteristic.chart === 'individuals' ? 'values' : 'subgroups'} (Quesenberry 1993)${u.points >= u.enoughPoints ? ', which these have' : ''}.`
          : '.') +
        (current.status === 'trial' ? ' The chart draws the 90% range faintly around the trial limits.' : ''),
    ]);
  }
  if (e.falseAlarm) {
    items.push([
      strong('Noise alone'),
      `: with the rules this chart uses (from ${rulesText}) and ${plural(e.falseAlarm.points, 'point')} of this baseline in the period, a perfectly stable process would show at least one signal with probability ${pct(e.falseAlarm.probability, 1)} (seeded simulation of ${RUNS} stable runs after ${HISTORY} points of history; ±${pct(e.falseAlarm.standardError, 1)}).`,
    ]);
  }
  const blocks: RootContent[] = items.length ? [list(items)] : [paragraph('Nothing to weigh: no shift, no recorded change and no estimated limits.')];
  if (e.exclusions.length) {
    const moved = (x: (typeof e.exclusions)[number], which: 'center' | 'ucl' | 'lcl') => {
      if (x.effect === 'after-basis') return 'none (after the freeze point)';
      if (x.effect === 'no-limits') return '–';
      const m = x.moves.find((mm) => mm.limit === which)!;
      return `${fmt(m.sigmas, 2)}σ${m.percent !== null ? ` (${fmt(m.percent, 1)}%)` : ''}`;
    };
    blocks.push(
      paragraph('What each exclusion did: how far the limits at that point would move if it were put back into the calculation, in sigmas of the plotted statistic and in percent.'),
      table(
        ['Point', 'Cause recorded', 'Center', 'UCL', 'LCL'],
        e.exclusions.map((x) => [label(x.index), x.entry.reason, moved(x, 'center'), moved(x, 'ucl'), moved(x, 'lcl')]),
        [null, null, 'right', 'right', 'right'],
      ),
    );
  }
  return blocks;
}

function rulesInWords(config: ReviewConfig): string {
  return typeof config.rules === 'string' ? `the ${config.rules} rules` : `the rules ${config.rules.join(', ')}`;
}

function characteristicBlocks(a: Assessment, input: PackInput, diagnostics: Diagnostic[]): RootContent[] {
  const c = a.characteristic;
  const fam = family(c.chart);
  const facts: string[] = [
    `${fam.label} chart`,
    c.unit ? `unit ${c.unit}` : '',
    c.better === 'target' ? 'on target is better' : `${c.better} is better`,
    c.spec ? `specification ${[c.spec.lower !== undefined ? `lower ${c.spec.lower}` : '', c.spec.target !== undefined ? `target ${c.spec.target}` : '', c.spec.upper !== undefined ? `upper ${c.spec.upper}` : ''].filter(Boolean).join(', ')} (not a control limit)` : '',
    c.safety ? 'safety-related: see Cautions' : '',
    c.tags.length ? `tags: ${c.tags.join(', ')}` : '',
    `data ${c.data}`,
  ].filter(Boolean);
  const history = a.status === 'assessed' ? a.ledger.history : a.history;
  const historyBlock: RootContent[] = history.length
    ? [table(['Date', 'Action', 'Point', 'Reason', 'By', 'Line'], history.map((e) => [e.date, e.action, e.point || '–', e.reason || '–', e.by || '–', String(e.line)]))]
    : [paragraph('No ledger entries yet.')];
  // `chart/` diagnostics are shown as chart notes beside the chart, not again here.
  const own = a.diagnostics.filter((d) => !d.ruleId.startsWith('chart/'));
  const issues: RootContent[] = own.length ? [heading(3, undefined, 'Data issues'), list(sortDiagnostics(own).map((d) => [formatDiagnostic(d)]))] : [];

  let blocks: Record<string, readonly RootContent[]>;
  let strings: Record<string, string>;
  if (a.status !== 'assessed') {
    blocks = {
      chart: [paragraph(strong('This characteristic could not be assessed'), ': the problems below must be fixed first.')],
      about: [paragraph(facts.join(' · '))],
      reasons: [list(sortDiagnostics(a.diagnostics).filter((d) => d.severity === 'error').map((d) => [formatDiagnostic(d)]))],
      'ledger-lines': [],
      limits: [paragraph('None: not assessed.')],
      estimates: [],
      evidence: [paragraph('None: not assessed.')],
      signals: [paragraph('None: not assessed.')],
      exclusions: [paragraph('None: not assessed.')],
      history: historyBlock,
      issues,
      notes: [],
      capability: [],
      rates: [],
    };
    strings = { name: c.name, id: c.id, action: 'cannot be assessed' };
  } else {
    const inPeriod = new Set(periodIndices(a, input.config));
    const excluded = [...a.ledger.excluded.entries()].sort(([x], [y]) => x - y);
    const sigRows = signalRows(a, inPeriod);
    blocks = {
      chart: [paragraph(chartImage(c.id, `${c.name}: ${fam.label} chart`, input.chartFile(c.id)))],
      about: [paragraph(facts.join(' · '))],
      reasons: [list(a.recommendation.reasons.map((r) => [r]))],
      'ledger-lines': a.recommendation.ledger.length
        ? [paragraph('Ledger lines to append once the decision is taken:'), code(a.recommendation.ledger.join('\n'), 'csv')]
        : [],
      limits: [
        table(['Baseline', 'Points', 'Panel', 'Status', 'Limits rest on', 'Center', 'LCL', 'UCL'], limitsRows(a), [
          'right', null, null, null, null, 'right', 'right', 'right',
        ]),
      ],
      estimates: estimatesText(a),
      evidence: evidenceBlocks(a, rulesInWords(input.config)),
      signals: sigRows.rows.length
        ? [table(['Rule', 'Panel', 'Points', 'Side', 'Persistence', 'Explained', 'In period'], sigRows.rows), ...sigRows.left]
        : [paragraph('No rule fired on any baseline.')],
      exclusions: excluded.length
        ? [
            table(
              ['Point', 'Date', 'Value', 'Cause recorded', 'By', 'Ledger line'],
              excluded.map(([i, e]) => [a.samples[i]!.label, a.samples[i]!.date, fmt(a.location.values[i]!, labelDecimals(a.location.values, a.location.limits)), e.reason, e.by || '–', String(e.line)]),
            ),
          ]
        : [paragraph('No points are excluded.')],
      history: historyBlock,
      issues,
      notes: notesBlocks(a),
      capability: capabilityBlocks(a),
      rates: rateBlocks(a, inPeriod),
    };
    strings = { name: c.name, id: c.id, action: actionWords(a) };
  }
  const filled = fillTemplate(input.templates.characteristic, { blocks, strings });
  diagnostics.push(...filled.diagnostics);
  // The template's first heading names the section; give it the characteristic's stable id.
  const first = filled.nodes.find((n): n is Heading => n.type === 'heading');
  if (first) first.data = { hProperties: { id: sectionId(c.id) } };
  return filled.nodes;
}

function sinceBlocks(s: SinceReport | undefined): RootContent[] {
  if (!s) return [];
  const to = (id: string, name: string) => link(`#${sectionId(id)}`, name);
  const section = (title: string, items: Inline[][], none: string): RootContent[] => [
    heading(3, undefined, title),
    items.length ? list(items) : paragraph(none),
  ];
  const change = (before: number, after: number) => {
    const pctText = Math.abs(before) > 1e-12 ? ` (${after >= before ? '+' : ''}${fmt(((after - before) / Math.abs(before)) * 100, 1)}%)` : '';
    return `${fmt(before, decimalsFor(before))} → ${fmt(after, decimalsFor(after))}${pctText}`;
  };
  const limitNames = { center: 'center line', ucl: 'upper limit', lcl: 'lower limit' } as const;
  return [
    heading(2, 'since-the-last-review', 'Since the last review'),
    paragraph(`Compared with the pack built for ${s.previous.asOf} (review period ${s.previous.period.from} to ${s.previous.period.to}).`),
    ...section('Actions that changed', s.actions.map((a) => [to(a.id, a.name), `: ${a.before} → ${a.after}`]), 'No characteristic changed its action.'),
    ...section('New signals', s.signals.map((x) => [to(x.id, x.name), `: ${rule(x.rule)?.short ?? x.rule}${x.panel === 'dispersion' ? ' (dispersion chart)' : ''} at ${x.points.map((p) => `"${p}"`).join(', ')}`]), 'No new signals.'),
    ...section('Limits that moved', s.limits.map((m) => [to(m.id, m.name), `: ${limitNames[m.limit]} ${change(m.before, m.after)}`]), 'No limits moved.'),
    ...section(
      'Ledger rows added',
      s.ledger.map((e) => [to(e.id, e.name), `: ${e.date} ${e.action}${e.point ? ` at "${e.point}"` : ''}${e.reason ? ` — ${e.reason}` : ''}${e.by ? ` (${e.by})` : ''}`]),
      s.historyUnknown ? 'The previous pack does not record the ledger, so added rows cannot be listed.' : 'No ledger rows were added.',
    ),
    ...section(
      'Characteristics added or removed',
      [...s.added.map((c) => [to(c.id, c.name), ' added'] as Inline[]), ...s.removed.map((c) => [`${c.name} (${c.id}) removed`] as Inline[])],
      'None added or removed.',
    ),
  ];
}

function decisionBlocks(input: PackInput): RootContent[] {
  const briefs = input.characteristics.map((c) => c.brief);
  const pending = briefs.filter((b) => b.action !== 'keep');
  if (pending.length === 0) return [paragraph('No decisions are needed: every characteristic keeps its limits.')];
  const order = { investigate: 0, 're-baseline': 1, freeze: 2, keep: 3 } as const;
  const rank = (b: Brief) => (b.action === null ? -1 : order[b.action]);
  const sorted = pending.slice().sort((x, y) => rank(x) - rank(y) || (x.id < y.id ? -1 : 1));
  return [
    paragraph(`${plural(pending.length, 'characteristic')} of ${briefs.length} need a decision this period.`),
    ...sorted.flatMap((b): RootContent[] => {
      const title = link(`#${sectionId(b.id)}`, b.name);
      if (b.status !== 'assessed') {
        return [
          heading(3, undefined, title, ' — cannot be assessed'),
          list(sortDiagnostics(b.diagnostics).filter((d) => d.severity === 'error').map((d) => [formatDiagnostic(d)])),
        ];
      }
      return [heading(3, undefined, title, ` — ${b.actionWords}`), list(b.reasons.map((r) => [r])), ...(b.ledger.length ? [code(b.ledger.join('\n'), 'csv')] : [])];
    }),
    ...(sorted.some((b) => b.ledger.length)
      ? [paragraph('Append a line to ledger.csv only once the decision is taken; plumbline never writes to the ledger.')]
      : []),
  ];
}

function overviewBlocks(input: PackInput): RootContent[] {
  const briefs = input.characteristics.map((c) => c.brief);
  const rows = briefs.map((b) => [[link(`#${sectionId(b.id)}`, b.name)], ...b.overview]);
  const expected = briefs.reduce((s, b) => s + (b.falseAlarm ?? 0), 0);
  return [
    table(['Characteristic', 'Chart', 'Limits', 'Points in period', 'Signals in period', 'Noise alone', 'Key figure', 'Action'], rows, [null, null, null, 'right', null, 'right', null, null]),
    paragraph(
      strong('False-alarm budget.'),
      ` "Noise alone" is the chance that the characteristic would show at least one signal this period even if nothing had changed, given ${rulesInWords(input.config)} and its number of points in the period. Were every characteristic stable, about ${fmt(expected, 1)} of these ${briefs.length} would still signal from noise alone, so expect some investigations to find no cause.`,
    ),
  ];
}

function cautionBlocks(input: PackInput, diagnostics: Diagnostic[]): RootContent[] {
  const flagged = input.characteristics.map((c) => c.brief).filter((b) => b.cautions !== null);
  if (flagged.length === 0) return [];
  const filled = fillTemplate(input.templates.cautions, {
    blocks: {
      'safety-characteristics': [list(flagged.map((b) => [link(`#${sectionId(b.id)}`, b.name)]))],
      'chart-cautions': chartCautionBlocks(flagged),
    },
    strings: {},
  });
  diagnostics.push(...filled.diagnostics);
  return filled.nodes;
}

function methodBlocks(input: PackInput, diagnostics: Diagnostic[]): RootContent[] {
  const inUse = new Set(typeof input.config.rules === 'string' ? RULE_SETS[input.config.rules] : input.config.rules);
  const rules = table(
    ['Rule id', 'What it looks for', 'Kind', 'In use'],
    RULES.map((r) => [r.id, r.description, r.group, inUse.has(r.id) ? 'yes' : 'no']),
  );
  const sizes = [2, 3, 4, 5, 6, 7, 8, 9, 10];
  const k = (v: number) => fmt(v, 4);
  const constTable = table(
    ['n', 'A2', 'A3', 'd2', 'd3', 'D3', 'D4', 'c4', 'B3', 'B4'],
    sizes.map((n) => {
      const c = constants(n);
      return [String(n), k(c.A2), k(c.A3), k(c.d2), k(c.d3), k(c.D3), k(c.D4), k(c.c4), k(c.B3), k(c.B4)];
    }),
    sizes.length ? ['right', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right'] : undefined,
  );
  const ruleChoice =
    typeof input.config.rules === 'string' ? `the ${input.config.rules} set` : `the rules listed in review.yaml (${input.config.rules.join(', ')})`;
  const filled = fillTemplate(input.templates.method, {
    blocks: { rules: [rules], constants: [constTable] },
    strings: { 'rule-set': ruleChoice, 'min-points': String(input.config.minPoints), 'freeze-after': String(input.config.freezeAfter) },
  });
  diagnostics.push(...filled.diagnostics);
  return filled.nodes;
}

/**
 * Gives every section heading (depth ≤ 2) a unique id and returns the
 * contents list. A made section's headings get their ids by the same rule;
 * `replayed` is false if one would now get another id than it had (its
 * nodes, and so its part, would not be the same).
 */
function assignIds(nodes: RootContent[]): { contents: { id: string; title: string }[]; replayed: boolean; bases: Map<RootContent, string> } {
  const seen = new Set<string>();
  const bases = new Map<RootContent, string>();
  const contents: { id: string; title: string }[] = [];
  let replayed = true;
  const unique = (base: string) => {
    let id = base;
    for (let k = 2; seen.has(id); k++) id = `${base}-${k}`;
    seen.add(id);
    return id;
  };
  for (const n of nodes) {
    const made = madeOf(n);
    if (made) {
      for (const h of made.headings) {
        if (unique(h.base) !== h.id) replayed = false;
        if (h.depth === 2) contents.push({ id: h.id, title: h.title });
      }
      continue;
    }
    if (n.type !== 'heading' || n.depth > 2) continue;
    const base = headingBase(n);
    bases.set(n, base);
    const id = unique(base);
    n.data = { ...n.data, hProperties: { ...(n.data?.hProperties ?? {}), id } };
    if (n.depth === 2) contents.push({ id, title: plain(n) });
  }
  return { contents, replayed, bases };
}

/** A heading's id before duplicates are told apart: the one given it, or its text's slug. */
function headingBase(n: Heading): string {
  return (n.data?.hProperties as { id?: string } | undefined)?.id ?? slug(plain(n));
}

/** What a made section records of its headings of level 1 and 2, once the tree has given them ids. */
export function madeHeadings(nodes: readonly RootContent[], bases: ReadonlyMap<RootContent, string>): MadeSection['headings'] {
  return nodes.flatMap((n) => (n.type === 'heading' && n.depth <= 2 ? [{ base: bases.get(n) ?? headingBase(n), id: headingBase(n), depth: n.depth, title: plain(n) }] : []));
}

/** The pack's tree, with what a build keeps of it for the next one. */
export interface PackTree {
  readonly tree: Root;
  readonly diagnostics: Diagnostic[];
  /** Each characteristic's section, as the nodes (the first placement) the tree holds it as: one made-section node where it was made before. */
  readonly sections: readonly (readonly RootContent[])[];
  /** What each heading's id was before duplicates were told apart (see `madeHeadings`). */
  readonly bases: ReadonlyMap<RootContent, string>;
  /** What filling each characteristic's template reported. */
  readonly sectionDiagnostics: readonly (readonly Diagnostic[])[];
}

/**
 * The pack as one tree. A characteristic's made section goes in as it was
 * made, unless a heading of it would get another id here (a heading
 * elsewhere took the id first): then every section is built again.
 */
export function buildPackTree(input: PackInput): PackTree {
  const diagnostics: Diagnostic[] = [];
  const { config } = input;
  const globalIssues: RootContent[] = input.diagnostics.length
    ? [heading(2, 'data-issues', 'Data issues'), list(sortDiagnostics(input.diagnostics).map((d) => [formatDiagnostic(d)]))]
    : [];
  const CONTENTS = '\u0000contents';
  const counts = new Map<string, number>();
  const briefs = input.characteristics.map((c) => c.brief);
  for (const b of briefs) {
    const key = b.action ?? 'cannot be assessed';
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  const actionOrder = ['investigate', 're-baseline', 'freeze', 'keep', 'cannot be assessed'];
  const audience = input.audience;
  const cover = table(
    ['Review', ''],
    [
      ...(audience ? [['Prepared for', audience.name ?? `characteristics tagged ${audience.tag}`], ['Contents', `only the characteristics tagged ${audience.tag}`]] : []),
      ['Organisation', config.organisation || '–'],
      ['Review period', `${config.period.from} to ${config.period.to}`],
      ['Built for', input.asOf],
      ['Characteristics', String(briefs.length)],
      ['Recommendations', actionOrder.filter((k) => counts.has(k)).map((k) => `${counts.get(k)} ${k}`).join(', ')],
      ['Safety-related', String(briefs.filter((b) => b.cautions !== null).length)],
      ['Input fingerprint', input.fingerprint],
      ['Built with', `${input.tool.name} ${input.tool.version}`],
    ],
  );
  const sectionDiagnostics: (readonly Diagnostic[])[] = [];
  const sections = input.characteristics.map((c, i): RootContent[] => {
    const own: Diagnostic[] = c.made ? [...c.made.diagnostics] : [];
    const nodes = c.made ? [sectionNode(c.made)] : characteristicBlocks(c.assessment(), input, own);
    diagnostics.push(...own);
    sectionDiagnostics[i] = own;
    return nodes;
  });
  const filled = fillTemplate(input.templates.pack, {
    blocks: {
      // Built by hand, not with text(): text() strips control characters, so no data can produce this marker.
      contents: [{ type: 'paragraph', children: [{ type: 'text', value: CONTENTS }] }],
      since: sinceBlocks(input.since),
      cover: [cover],
      decisions: decisionBlocks(input),
      overview: overviewBlocks(input),
      characteristics: sections.flat(),
      cautions: cautionBlocks(input, diagnostics),
      method: methodBlocks(input, diagnostics),
      'data-issues': globalIssues,
    },
    strings: {
      title: config.title,
      organisation: config.organisation || '–',
      'period-from': config.period.from,
      'period-to': config.period.to,
      'as-of': input.asOf,
      fingerprint: input.fingerprint,
      'fingerprint-short': input.fingerprint.slice(0, 16),
      tool: `${input.tool.name} ${input.tool.version}`,
      count: String(briefs.length),
    },
  });
  diagnostics.push(...filled.diagnostics);
  const nodes = filled.nodes;
  // Rewritten history goes at the top whatever the template says: right after the title, before anything else.
  if (input.rewritten) {
    const title = nodes.findIndex((n) => n.type === 'heading' && n.depth === 1);
    nodes.splice(title + 1, 0, heading(2, 'ledger-history-rewritten', 'Ledger history rewritten'), paragraph(strong('Warning.'), ` ${input.rewritten}`));
  }
  const { contents, replayed, bases } = assignIds(nodes);
  if (!replayed) return buildPackTree({ ...input, characteristics: input.characteristics.map((c) => ({ brief: c.brief, assessment: () => c.assessment() })) });
  const at = nodes.findIndex((n) => n.type === 'paragraph' && plain(n) === CONTENTS);
  if (at >= 0) {
    nodes.splice(at, 1, list(contents.filter((c) => c.id !== 'contents').map((c) => [link(`#${c.id}`, c.title)])));
  }
  // A template problem repeats for every characteristic; report it once.
  const seen = new Set<string>();
  const unique = diagnostics.filter((d) => {
    const key = `${d.file}:${d.line}:${d.message}`;
    return seen.has(key) ? false : (seen.add(key), true);
  });
  return { tree: { type: 'root', children: nodes }, diagnostics: unique, sections, bases, sectionDiagnostics };
}
