/**
 * A characteristic's data CSV into samples: one row per point, or for the
 * subgroup families one row per measurement with rows of the same label (or
 * date) forming a subgroup. Dates must not go backwards.
 */
import { type Diagnostic, error, warning } from '../diagnostics.ts';
import { type Characteristic, type ConfiguredCharacteristic, DEFAULT_CSV, type Observation, type Sample } from '../model.ts';
import { chooseCountChart } from '../review/chart-choice.ts';
import { MAX_SUBGROUP, MIN_SUBGROUP } from '../stats/constants.ts';
import { family } from '../stats/index.ts';
import { type CsvTable, columnOf, readCsvTable } from './csv-table.ts';
import { dateProblem } from './dates.ts';
import { parseNumberCell } from './numbers.ts';

const COLUMNS: Record<Observation['kind'], readonly string[]> = {
  measurements: ['date', 'value'],
  proportion: ['date', 'defectives', 'inspected'],
  count: ['date', 'count'],
  rate: ['date', 'count', 'exposure'],
  gap: ['date', 'between'],
  // One row per event; the t chart plots the days from one event to the next.
  interval: ['date'],
};

export function requiredColumns(ch: ConfiguredCharacteristic): readonly string[] {
  return ch.chart === 'auto' ? ['date', 'count'] : COLUMNS[family(ch.chart).observation];
}

export interface DataRead {
  readonly samples: Sample[];
  readonly diagnostics: Diagnostic[];
  /** The characteristic with `chart: auto` resolved. */
  readonly characteristic: Characteristic;
}

/** `chart: auto` reads counts: with an exposure column as a u chart would, without one as a c chart would. */
function countChart(ch: ConfiguredCharacteristic, header: readonly string[]): Characteristic {
  const { chart: _auto, ...rest } = ch;
  return { ...rest, chart: header.includes('exposure') ? 'u' : 'c' };
}

/** `through`: the review period's last day; `chart: auto` decides on the points up to it. */
export function readDataFile(text: string, ch: ConfiguredCharacteristic, through?: string): DataRead {
  const file = ch.data;
  const format = ch.csv ?? DEFAULT_CSV;
  const read = readCsvTable(text, file, ch.id, format.delimiter);
  const diagnostics = [...read.diagnostics];
  const asRead: Characteristic = ch.chart === 'auto' ? countChart(ch, read.table?.header ?? []) : { ...ch, chart: ch.chart };
  if (!read.table) return { samples: [], diagnostics, characteristic: asRead };
  const samples = rowsToSamples(read.table, asRead, diagnostics);
  if (ch.chart !== 'auto' || hasErrorsIn(diagnostics)) return { samples, diagnostics, characteristic: asRead };
  const chosen = chooseCountChart(asRead, samples, through);
  return { samples: chosen.samples, diagnostics, characteristic: chosen.characteristic };
}

const hasErrorsIn = (ds: readonly Diagnostic[]) => ds.some((d) => d.severity === 'error');

/** One valid data row, before rows are grouped into points. */
/** A row read and checked; shaped as a Sample (same fields, same order), so a point can be the row itself. */
type Row = Sample;

function measured(r: Row): readonly number[] {
  return r.observation.kind === 'measurements' ? r.observation.values : [];
}

function rowsToSamples(table: CsvTable, ch: Characteristic, diagnostics: Diagnostic[]): Sample[] {
  const file = ch.data;
  const where = (line: number, column?: number) => ({ file, line, column, characteristic: ch.id });
  const kind = family(ch.chart).observation;
  const required = COLUMNS[kind];
  const allowed = new Set([...required, 'label']);
  const col = new Map(table.header.map((h, i) => [h, i]));
  let broken = false;
  for (const name of required) {
    if (!col.has(name)) {
      diagnostics.push(
        error('data/missing-column', where(table.headerLine), `Column "${name}" is missing; a ${ch.chart} chart reads ${required.join(', ')} (and label, optionally).`),
      );
      broken = true;
    }
  }
  table.header.forEach((h, i) => {
    if (!allowed.has(h) && h !== '') {
      diagnostics.push(
        error('data/unknown-column', where(table.headerLine, columnOf(table.header, i)), `Column "${h}" is not read by a ${ch.chart} chart; expected ${required.join(', ')} (and label, optionally).`),
      );
      broken = true;
    }
  });
  if (broken) return [];
  if (table.rows.length === 0) {
    diagnostics.push(warning('data/no-rows', where(table.headerLine), 'The file has a header but no data rows yet.'));
    return [];
  }

  const cell = (cells: readonly string[], name: string) => (col.has(name) ? cells[col.get(name)!]! : '');
  const at = (cells: readonly string[], name: string) => columnOf(cells, col.get(name)!);
  const rows: Row[] = [];
  let lastDate = '';
  let lastDateLine = 0;
  for (const r of table.rows) {
    let ok = true;
    const read = cell(r.cells, 'date');
    // Rows of one day share one string (a million minute readings held a million copies of some
    // 700 dates, 32 MB); rows of one subgroup share a date, checked once.
    const date = read === lastDate ? lastDate : read;
    const dp = date === lastDate ? null : dateProblem(date);
    if (dp) {
      diagnostics.push(error('data/bad-date', where(r.line, at(r.cells, 'date')), `Column "date" ${dp}.`));
      ok = false;
    } else if (date < lastDate) {
      diagnostics.push(
        error('data/date-order', where(r.line, at(r.cells, 'date')), `Date ${date} is earlier than ${lastDate} on line ${lastDateLine}; rows must be in date order.`),
      );
      ok = false;
    } else {
      lastDate = date;
      lastDateLine = r.line;
    }
    const num = (name: string, check?: (v: number) => string | null): number | undefined => {
      const parsed = parseNumberCell(cell(r.cells, name), ch.csv?.decimal ?? '.');
      if (!parsed.ok) {
        diagnostics.push(error('data/not-a-number', where(r.line, at(r.cells, name)), `Column "${name}" ${parsed.problem}.`));
        ok = false;
        return undefined;
      }
      const problem = check?.(parsed.value);
      if (problem) {
        diagnostics.push(error('data/out-of-range', where(r.line, at(r.cells, name)), `Column "${name}" ${problem}.`));
        ok = false;
        return undefined;
      }
      return parsed.value;
    };
    const wholeCount = (v: number) => (v < 0 ? `is ${v}; a count cannot be negative` : Number.isInteger(v) ? null : `is ${v}; a count must be a whole number`);
    let observation: Observation | undefined;
    switch (kind) {
      case 'measurements': {
        const value = num('value');
        if (value !== undefined) observation = { kind, values: [value] };
        break;
      }
      case 'count': {
        const count = num('count', wholeCount);
        if (count !== undefined) observation = { kind, count };
        break;
      }
      case 'proportion': {
        const defectives = num('defectives', wholeCount);
        const inspected = num('inspected', (v) => wholeCount(v) ?? (v === 0 ? 'is 0; at least one unit must be inspected' : null));
        if (defectives !== undefined && inspected !== undefined) {
          if (defectives > inspected) {
            diagnostics.push(
              error('data/out-of-range', where(r.line, at(r.cells, 'defectives')), `${defectives} defectives out of ${inspected} inspected: defectives cannot exceed inspected.`),
            );
            ok = false;
          } else {
            observation = { kind, defectives, inspected };
          }
        }
        break;
      }
      case 'rate': {
        const count = num('count', wholeCount);
        const exposure = num('exposure', (v) => (v <= 0 ? `is ${v}; exposure must be above 0` : null));
        // With `per`, the area of opportunity is exposure/per, so the plotted rate is per `per` units (REFERENCE §7).
        if (count !== undefined && exposure !== undefined) observation = { kind, count, exposure: exposure / (ch.per ?? 1) };
        break;
      }
      case 'gap': {
        const between = num('between', (v) => (v < 0 ? `is ${v}; the opportunities between events cannot be negative` : null));
        if (between !== undefined) observation = { kind, between };
        break;
      }
      case 'interval':
        // Filled in below, once the previous event's date is known.
        observation = { kind, days: 0 };
        break;
    }
    const label = cell(r.cells, 'label') || date;
    if (ok && observation !== undefined) rows.push({ label, date, line: r.line, observation });
  }
  if (kind === 'interval') return uniquePoints(intervals(rows, col.has('label')), ch, diagnostics);
  return kind === 'measurements' && ch.chart !== 'individuals' ? groupSubgroups(rows, ch, diagnostics) : uniquePoints(rows, ch, diagnostics);
}

const DAY_MS = 86_400_000;
const dayNumber = (iso: string) => Date.parse(`${iso}T00:00:00Z`) / DAY_MS;

/**
 * Event rows to t-chart points: each event after the first is a point whose
 * value is the days since the event before it. Without a label column,
 * several events on one day are told apart as "2026-03-04 #2", "#3", …
 */
function intervals(rows: readonly Row[], labelled: boolean): Row[] {
  const out: Row[] = [];
  const onDay = new Map<string, number>();
  rows.forEach((r, i) => {
    const k = (onDay.get(r.date) ?? 0) + 1;
    onDay.set(r.date, k);
    if (i === 0) return;
    const label = labelled || k === 1 ? r.label : `${r.date} #${k}`;
    out.push({ ...r, label, observation: { kind: 'interval', days: dayNumber(r.date) - dayNumber(rows[i - 1]!.date) } });
  });
  return out;
}

function uniquePoints(rows: readonly Row[], ch: Characteristic, diagnostics: Diagnostic[]): Sample[] {
  // Labels in strictly rising order (dates, times) are all different: no need to remember a million of them.
  let rising = true;
  for (let i = 1; i < rows.length && rising; i++) rising = rows[i - 1]!.label < rows[i]!.label;
  if (rising) return rows.slice();
  const seen = new Map<string, number>();
  const out: Sample[] = [];
  for (const r of rows) {
    const first = seen.get(r.label);
    if (first !== undefined) {
      diagnostics.push(
        error('data/duplicate-point', { file: ch.data, line: r.line, characteristic: ch.id }, `Point "${r.label}" appears again (first at line ${first}); each row must name a different point (add a label column to tell rows with the same date apart).`),
      );
      continue;
    }
    seen.set(r.label, r.line);
    out.push(r);
  }
  return out;
}

/** Consecutive rows with the same label (or date) form one subgroup. */
function groupSubgroups(rows: readonly Row[], ch: Characteristic, diagnostics: Diagnostic[]): Sample[] {
  const where = (line: number) => ({ file: ch.data, line, characteristic: ch.id });
  const out: Sample[] = [];
  const closed = new Map<string, number>();
  let current: { label: string; date: string; line: number; values: number[] } | undefined;
  const close = () => {
    if (!current) return;
    const n = current.values.length;
    if (n < MIN_SUBGROUP || n > MAX_SUBGROUP) {
      diagnostics.push(
        error('data/subgroup-size', where(current.line), `Subgroup "${current.label}" has ${n} measurement${n === 1 ? '' : 's'}; a ${ch.chart} chart needs ${MIN_SUBGROUP} to ${MAX_SUBGROUP}.`),
      );
    } else {
      out.push({ label: current.label, date: current.date, line: current.line, observation: { kind: 'measurements', values: current.values } });
    }
    closed.set(current.label, current.line);
  };
  for (const r of rows) {
    if (current && r.label === current.label) {
      current.values.push(...measured(r));
      continue;
    }
    close();
    const earlier = closed.get(r.label);
    if (earlier !== undefined) {
      diagnostics.push(
        error('data/duplicate-point', where(r.line), `Subgroup "${r.label}" appears again after other rows (it starts at line ${earlier}); keep a subgroup's rows together.`),
      );
      current = undefined;
      continue;
    }
    current = { label: r.label, date: r.date, line: r.line, values: [...measured(r)] };
  }
  close();
  return out;
}
