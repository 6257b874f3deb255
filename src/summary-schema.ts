/**
 * The schema of summary.json (format 1), the contract in DESIGN.md
 * ("Outputs"). A test parses every summary the demo builds with it, so it
 * cannot drift from `buildSummary`; `npm run schemas` writes it out as JSON
 * Schema for other tools. Objects are open: later versions may add fields.
 */
import { z } from 'zod';
import { CHART_IDS, LEDGER_ACTIONS } from './model.ts';

const num = z.number();
const nullableNum = z.number().nullable();
const label = z.string();

const diagnostic = z.looseObject({
  severity: z.enum(['error', 'warning', 'info']),
  ruleId: z.string(),
  file: z.string(),
  line: z.number().int().nullable(),
  column: z.number().int().nullable(),
  message: z.string(),
});

const signal = z.looseObject({
  rule: z.string(),
  panel: z.enum(['location', 'dispersion']),
  baseline: z.number().int(),
  side: z.enum(['above', 'below']).nullable(),
  points: z.array(label),
  flagged: z.array(label),
  persistence: z.enum(['fleeting', 'persistent']),
  explained: z.boolean(),
});

const point = z.looseObject({
  label,
  date: z.string(),
  value: num,
  center: nullableNum,
  ucl: nullableNum,
  lcl: nullableNum,
  excluded: z.boolean(),
  signals: z.array(z.string()),
});

const history = z.looseObject({ line: z.number().int(), date: z.string(), action: z.enum(LEDGER_ACTIONS), point: z.string(), reason: z.string(), by: z.string() });

const index = z.looseObject({ value: num, interval: z.tuple([num, num]) });
const rate = z.looseObject({ count: num, exposure: num, rate: num, interval: z.tuple([num, num]) });

/** Reported capability, the reason it is withheld, or null where it does not apply (no specification, not a variables chart). */
const capability = z
  .discriminatedUnion('status', [
    z.looseObject({
      status: z.literal('reported'),
      points: z.number().int(),
      values: z.number().int(),
      mean: num,
      sigmaWithin: num,
      sigmaOverall: num,
      cp: index.nullable(),
      cpk: index,
      pp: index.nullable(),
      ppk: index,
      ppm: z.looseObject({ within: num, overall: num }),
      normality: z.looseObject({ test: z.literal('anderson-darling'), n: z.number().int(), statistic: num, adjusted: num, p: num, normal: z.boolean() }).nullable(),
      notes: z.array(z.string()),
    }),
    z.looseObject({ status: z.literal('withheld'), reason: z.string() }),
  ])
  .nullable();

const common = {
  id: z.string(),
  name: z.string(),
  chart: z.enum(CHART_IDS),
  unit: z.string(),
  better: z.enum(['higher', 'lower', 'target']),
  safety: z.boolean(),
  tags: z.array(z.string()),
  capability,
  per: nullableNum,
  chartChoice: z.string().nullable(),
  notes: z.array(z.string()),
  overdispersion: z
    .looseObject({ points: z.number().int(), ratio: num, chiSquare: num, df: z.number().int(), p: num, sigmaZ: num, recommend: z.boolean(), under: z.boolean() })
    .nullable(),
  rates: z.looseObject({ per: num, level: num, baseline: rate.nullable(), points: z.array(rate.extend({ label })) }).nullable(),
  diagnostics: z.array(diagnostic),
  history: z.array(history),
};

const assessed = z.looseObject({
  ...common,
  status: z.literal('assessed'),
  statistic: z.string(),
  points: z.array(point),
  dispersion: z
    .looseObject({
      statistic: z.string(),
      points: z.array(z.looseObject({ label, date: z.string(), value: nullableNum, center: nullableNum, ucl: nullableNum, lcl: nullableNum, signals: z.array(z.string()) })),
      signals: z.array(signal),
    })
    .nullable(),
  baselines: z.array(
    z.looseObject({
      start: label.nullable(),
      end: label.nullable(),
      status: z.enum(['trial', 'frozen']),
      source: z.enum(['data', 'standard']),
      basis: z.array(label),
      usable: z.number().int(),
      frozenAt: label.nullable(),
      reason: z.string().nullable(),
      estimate: z.record(z.string(), num).nullable(),
    }),
  ),
  signals: z.array(signal),
  recommendation: z.looseObject({
    action: z.enum(['keep', 'freeze', 're-baseline', 'investigate']),
    reasons: z.array(z.string()),
    ledger: z.array(z.string()),
    changePoint: label.nullable(),
  }),
  changePoint: z
    .looseObject({ label, interval: z.tuple([label, label]), method: z.string(), significance: num, likelihoodRatio: num, before: num, after: num })
    .nullable(),
  evidence: z.looseObject({
    changeTests: z.array(z.looseObject({ change: label, method: z.string(), p: num, significant: z.boolean(), better: z.boolean().nullable(), morePeriods: z.number().int().nullable() })),
    exclusions: z.array(z.looseObject({ point: label, effect: z.enum(['moved', 'after-basis', 'no-limits']) })),
    limitUncertainty: z.looseObject({ points: z.number().int(), uclSE: nullableNum, lclSE: nullableNum }).nullable(),
    falseAlarm: z.looseObject({ probability: num, standardError: num, points: z.number().int(), runs: z.number().int() }).nullable(),
    refresh: z.looseObject({ center: num, ucl: num, lcl: num }).nullable(),
  }),
});

const notAssessed = z.looseObject({
  ...common,
  status: z.literal('not-assessed'),
  points: z.array(point).length(0),
  dispersion: z.null(),
  baselines: z.array(z.unknown()).length(0),
  signals: z.array(z.unknown()).length(0),
  recommendation: z.null(),
  changePoint: z.null(),
  evidence: z.null(),
});

export const summarySchema = z.looseObject({
  format: z.literal(1),
  tool: z.looseObject({ name: z.literal('plumbline'), version: z.string() }),
  title: z.string(),
  organisation: z.string(),
  period: z.looseObject({ from: z.string(), to: z.string() }),
  asOf: z.string(),
  rules: z.union([z.string(), z.array(z.string())]),
  minPoints: z.number().int(),
  freezeAfter: z.number().int(),
  counts: z.looseObject({
    characteristics: z.number().int(),
    assessed: z.number().int(),
    notAssessed: z.number().int(),
    actions: z.record(z.string(), z.number().int()),
    expectedFalseAlarms: num,
  }),
  characteristics: z.array(z.discriminatedUnion('status', [assessed, notAssessed])),
  /** The ledger's running hash, and whether earlier rows changed since the previous pack. */
  integrity: z
    .looseObject({
      ledgerRows: z.number().int(),
      ledgerHead: z.string(),
      rewritten: z.looseObject({ comparedWith: z.string(), row: z.number().int(), previousRows: z.number().int(), currentRows: z.number().int() }).nullable(),
    })
    .nullable(),
  diagnostics: z.array(diagnostic),
});
