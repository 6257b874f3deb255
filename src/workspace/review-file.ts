/**
 * review.yaml: parse with positions, validate against the schema, then the
 * checks a schema cannot express. Every problem is a diagnostic on the line
 * of the offending value.
 */
import { LineCounter, isNode, parseDocument } from 'yaml';
import { type Diagnostic, error } from '../diagnostics.ts';
import { type ChartChoice, type ConfiguredCharacteristic, type CsvFormat, DEFAULT_CSV, type ReviewConfig, type Standard } from '../model.ts';
import { GAP_CHARTS } from '../stats/index.ts';
import { FAMILIES } from '../stats/index.ts';
import { reviewSchema } from './review-schema.ts';

export const REVIEW_FILE = 'review.yaml';

type Path = readonly (string | number)[];

function describePath(path: Path): string {
  return path.reduce<string>((s, p) => (typeof p === 'number' ? `${s}[${p}]` : s ? `${s}.${p}` : p), '');
}

export function readReview(text: string, file = REVIEW_FILE): { config?: ReviewConfig; diagnostics: Diagnostic[] } {
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, prettyErrors: false, uniqueKeys: true });
  const at = (offset: number | undefined) => {
    if (offset === undefined) return { file };
    const pos = lineCounter.linePos(offset);
    return { file, line: pos.line, column: pos.col };
  };
  const diagnostics: Diagnostic[] = [];
  for (const e of doc.errors) {
    diagnostics.push(error('yaml/syntax', at(e.pos[0]), `YAML cannot be read here: ${e.message.split('\n')[0]}`));
  }
  if (diagnostics.length > 0) return { diagnostics };

  /** The position of the value at `path`, or of its nearest parent that exists. */
  const place = (path: Path) => {
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return at(node.range[0]);
    }
    return at(0);
  };

  // toJS resolves aliases and can still fail (an alias to no anchor, a recursive merge): that is the file's problem too.
  let raw: unknown;
  try {
    raw = doc.toJS({ maxAliasCount: 100 });
  } catch (e) {
    return { diagnostics: [error('yaml/syntax', { file, line: 1 }, `YAML cannot be read: ${String((e as Error).message).split('\n')[0]}`)] };
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
    return { diagnostics: [error('review/not-a-mapping', { file, line: 1 }, 'review.yaml must be a mapping of settings (title, period, characteristics, ...).')] };
  }
  const parsed = reviewSchema.safeParse(raw);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const path = issue.path.filter((p): p is string | number => typeof p !== 'symbol');
      const unknown = issue.code === 'unrecognized_keys' ? issue.keys : [];
      if (unknown.length > 0) {
        for (const key of unknown) {
          diagnostics.push(error('review/unknown-field', place([...path, key]), `Unknown field "${describePath([...path, key])}"; check its spelling.`));
        }
        continue;
      }
      const name = describePath(path) || 'review.yaml';
      const missing = issue.code === 'invalid_type' && doc.getIn(path) === undefined;
      diagnostics.push(
        error(
          missing ? 'review/missing-field' : 'review/invalid',
          place(path),
          missing ? `Required field "${name}" is missing.` : `"${name}" ${issue.message}.`,
        ),
      );
    }
    return { diagnostics };
  }
  const r = parsed.data;

  if (r.period.from > r.period.to) {
    diagnostics.push(error('review/period-reversed', place(['period', 'to']), `period.to (${r.period.to}) is before period.from (${r.period.from}).`));
  }
  if (r.freezeAfter < r.minPoints) {
    diagnostics.push(error('review/invalid', place(['freezeAfter']), `freezeAfter (${r.freezeAfter}) must be at least minPoints (${r.minPoints}).`));
  }

  // A characteristic's csv settings fill in from the workspace's, which fill in from the defaults.
  const workspaceCsv: CsvFormat = { ...DEFAULT_CSV, ...definedOnly(r.csv ?? {}) };
  const csvProblem = (f: CsvFormat, path: Path) => {
    if (f.delimiter === ',' && f.decimal === ',') {
      diagnostics.push(error('review/csv', place(path), 'A comma cannot be both the delimiter and the decimal mark; with decimal: "," use delimiter: ";" (the usual European CSV).'));
    }
  };
  if (r.csv) csvProblem(workspaceCsv, ['csv']);
  const seen = new Map<string, number>();
  const characteristics: ConfiguredCharacteristic[] = [];
  r.characteristics.forEach((c, i) => {
    const first = seen.get(c.id);
    if (first !== undefined) {
      diagnostics.push(error('review/duplicate-id', place(['characteristics', i, 'id']), `Characteristic id "${c.id}" is used twice (also characteristics[${first}]).`));
    } else {
      seen.set(c.id, i);
    }
    const chart = c.chart as ChartChoice;
    // `auto` resolves to a count family once the data is read; check its standard as a c chart's.
    const fam = FAMILIES[chart === 'auto' ? 'c' : chart];
    if (c.per !== undefined && chart !== 'u' && chart !== 'laney-u' && chart !== 'auto') {
      diagnostics.push(error('review/per', place(['characteristics', i, 'per']), `"per" sets the base of a rate (e.g. 200000 hours worked); only u, laney-u and auto charts plot rates, not ${chart}.`));
    }
    if (chart !== 'auto' && GAP_CHARTS.has(chart) && c.better !== 'higher') {
      diagnostics.push(
        error('review/better', place(['characteristics', i, 'better']), `A ${chart} chart plots the gaps between events, so longer is better: set better: higher (not ${c.better}).`),
      );
    }
    const csv: CsvFormat = { ...workspaceCsv, ...definedOnly(c.csv ?? {}) };
    if (c.csv) csvProblem(csv, ['characteristics', i, 'csv']);
    let standard: Standard | undefined;
    if (c.standard) {
      const here = place(['characteristics', i, 'standard']);
      if (fam.standardKind === 'variables') {
        if (c.standard.sigma === undefined || !(c.standard.sigma > 0)) {
          diagnostics.push(error('review/standard', here, `A ${c.chart} chart's standard needs center and a positive sigma.`));
        } else {
          standard = { kind: 'variables', center: c.standard.center, sigma: c.standard.sigma };
        }
      } else if (c.standard.sigma !== undefined) {
        diagnostics.push(error('review/standard', here, `A ${c.chart} chart's standard is its center alone (the known ${c.chart === 'np' ? 'p' : c.chart}); remove sigma.`));
      } else if ((c.chart === 'p' || c.chart === 'np' || c.chart === 'laney-p') && !(c.standard.center > 0 && c.standard.center < 1)) {
        diagnostics.push(error('review/standard', here, `The known fraction p must lie between 0 and 1, not ${c.standard.center}.`));
      } else if (!(c.standard.center > 0)) {
        diagnostics.push(error('review/standard', here, `The known ${c.chart} must be above 0, not ${c.standard.center}.`));
      } else {
        standard = { kind: 'attributes', center: c.standard.center };
      }
    }
    characteristics.push({
      id: c.id,
      name: c.name,
      chart,
      data: c.data,
      unit: c.unit,
      better: c.better,
      ...(c.spec ? { spec: definedOnly(c.spec) } : {}),
      ...(standard ? { standard } : {}),
      safety: c.safety,
      tags: c.tags,
      ...(c.per !== undefined ? { per: c.per } : {}),
      ...(csv.delimiter !== DEFAULT_CSV.delimiter || csv.decimal !== DEFAULT_CSV.decimal ? { csv } : {}),
    });
  });
  if (diagnostics.length > 0) return { diagnostics };
  return {
    config: {
      title: r.title,
      organisation: r.organisation,
      period: r.period,
      rules: r.rules,
      minPoints: r.minPoints,
      freezeAfter: r.freezeAfter,
      customers: r.customers,
      characteristics,
    },
    diagnostics,
  };
}

/** The line of characteristics[i].data in review.yaml, for path problems found later. */
export function dataFieldLine(text: string, index: number): { line?: number; column?: number } {
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter });
  const node = doc.getIn(['characteristics', index, 'data'], true);
  if (isNode(node) && node.range) {
    const pos = lineCounter.linePos(node.range[0]);
    return { line: pos.line, column: pos.col };
  }
  return {};
}

function definedOnly<T extends object>(o: T): { [K in keyof T]: Exclude<T[K], undefined> } {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as { [K in keyof T]: Exclude<T[K], undefined> };
}
