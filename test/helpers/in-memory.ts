/** Run the whole engine on a workspace held in memory: CSV text in, assessment out. */
import { analyse, type Assessment } from '../../src/analyse.ts';
import type { Characteristic, ChartChoice, ConfiguredCharacteristic, ReviewConfig } from '../../src/model.ts';
import { readDataFile } from '../../src/workspace/data-file.ts';
import { readLedger } from '../../src/workspace/ledger-file.ts';

export interface InMemoryCase {
  readonly chart: ChartChoice;
  /** Rate charts: the plotted rate is per this many units of exposure. */
  readonly per?: number;
  readonly spec?: Characteristic['spec'];
  readonly csv: string;
  readonly ledger?: string;
  readonly better?: Characteristic['better'];
  readonly standard?: Characteristic['standard'];
  readonly period?: ReviewConfig['period'];
  readonly rules?: ReviewConfig['rules'];
  readonly minPoints?: number;
  readonly freezeAfter?: number;
}

export function assess(c: InMemoryCase): Assessment {
  const configured: ConfiguredCharacteristic = {
    id: 'x',
    name: 'X',
    chart: c.chart,
    data: 'data/x.csv',
    unit: '',
    better: c.better ?? 'target',
    ...(c.standard ? { standard: c.standard } : {}),
    safety: false,
    tags: [],
    ...(c.per !== undefined ? { per: c.per } : {}),
    ...(c.spec ? { spec: c.spec } : {}),
  };
  const config: ReviewConfig = {
    title: 'T',
    organisation: '',
    period: c.period ?? { from: '1900-01-01', to: '2999-12-31' },
    rules: c.rules ?? 'western-electric',
    minPoints: c.minPoints ?? 5,
    freezeAfter: c.freezeAfter ?? 20,
    customers: {},
    characteristics: [configured],
  };
  const data = readDataFile(c.csv, configured, config.period.to);
  const characteristic: Characteristic = data.characteristic;
  const ledger = readLedger(c.ledger ?? 'date,characteristic,action,point,reason,by\n', new Set(['x']));
  return analyse({
    config,
    characteristic,
    samples: data.samples,
    laterLabels: new Set(),
    ledger: ledger.entries,
    ledgerFile: 'ledger.csv',
    diagnostics: [...data.diagnostics, ...ledger.diagnostics],
    asOf: config.period.to,
  });
}

/** Data CSV with one point per row, labelled 1, 2, 3, … on consecutive days. */
export function pointsCsv(header: string, rows: readonly (readonly number[])[]): string {
  const lines = rows.map((r, i) => `${i + 1},${isoDay(i)},${r.join(',')}`);
  return `label,${header}\n${lines.join('\n')}\n`;
}

export function isoDay(i: number): string {
  return new Date(Date.UTC(2020, 0, 1) + i * 86400000).toISOString().slice(0, 10);
}

export function ledgerCsv(rows: readonly string[]): string {
  return `date,characteristic,action,point,reason,by\n${rows.join('\n')}\n`;
}

export function assessed(a: Assessment) {
  if (a.status !== 'assessed') throw new Error(`not assessed: ${a.diagnostics.map((d) => d.message).join('; ')}`);
  return a;
}
