/**
 * Fuzzing with fast-check: the readers and the whole analysis on generated
 * workspaces, valid and broken. The promise checked: plumbline never throws
 * on input — every problem comes back as a diagnostic with a file and a
 * sentence, and a characteristic that cannot be assessed says why.
 *
 * `npm test` runs a few hundred cases per property; `npm run fuzz` runs
 * 10,000 (FUZZ_RUNS sets the number, FUZZ_SEED the seed; runs are seeded so a
 * failure repeats). The whole build with its renderers runs a twentieth as
 * many, since each draws every chart and lays out a PDF.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { planPack } from '../../src/build.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { analyse } from '../../src/analyse.ts';
import type { Diagnostic } from '../../src/diagnostics.ts';
import { CHART_IDS } from '../../src/model.ts';
import { summaryOf } from '../../src/summary.ts';
import { readCsvTable } from '../../src/workspace/csv-table.ts';
import { readDataFile } from '../../src/workspace/data-file.ts';
import { readLedger } from '../../src/workspace/ledger-file.ts';
import { readReview } from '../../src/workspace/review-file.ts';

const RUNS = Number(process.env.FUZZ_RUNS ?? 300);
const SEED = Number(process.env.FUZZ_SEED ?? 20261202);
const opts = (scale = 1) => ({ numRuns: Math.max(1, Math.round(RUNS * scale)), seed: SEED });

function wellFormed(ds: readonly Diagnostic[]) {
  for (const d of ds) {
    expect(typeof d.file).toBe('string');
    expect(d.message.length).toBeGreaterThan(0);
    if (d.line !== undefined) expect(d.line).toBeGreaterThanOrEqual(1);
  }
}

/** Text that is mostly CSV-shaped: cells of odd characters, quotes, delimiters and line ends. */
const cell = fc.oneof(
  fc.string(),
  fc.constantFrom('', 'NaN', '-0', '1e999', '1e-320', '0x1f', '  7 ', '"', '""', '2026-02-30', '2026-01-01T00:00Z', '\u0000', '\ufeff'),
  fc.double({ noNaN: false }).map(String),
  fc.integer().map(String),
);
const csvText = fc
  .array(fc.array(cell, { maxLength: 6 }), { maxLength: 12 })
  .chain((rows) => fc.constantFrom(',', ';', '\t').map((d) => rows.map((r) => r.join(d)).join(fc.sample(fc.constantFrom('\n', '\r\n', '\r'), 1)[0]!)));

describe('readers never throw, and say where every problem is', () => {
  it('readCsvTable on any text', () => {
    fc.assert(fc.property(fc.oneof(fc.string(), csvText, fc.string({ unit: 'binary' })), (t) => wellFormed(readCsvTable(t, 'x.csv').diagnostics)), opts());
  });
  it('readLedger on any CSV-shaped text', () => {
    const ledger = fc.oneof(csvText, csvText.map((t) => `date,characteristic,action,point,reason,by\n${t}`));
    fc.assert(fc.property(ledger, (t) => wellFormed(readLedger(t, new Set(['a', 'b'])).diagnostics)), opts());
  });
  it('readReview on any text and on generated YAML mappings', () => {
    const mapping = fc.dictionary(fc.constantFrom('title', 'period', 'rules', 'minPoints', 'freezeAfter', 'characteristics', 'csv', 'customers', 'x'), fc.jsonValue(), { maxKeys: 6 });
    const yaml = fc.oneof(fc.string(), fc.string({ unit: 'binary' }), mapping.map((m) => JSON.stringify(m)), fc.constantFrom('*!', 'a: &x [*x]', '<<: *y', 'a: !!binary x', '? [a]\n: b', 'x: {a: 1, a: 2}'));
    fc.assert(
      fc.property(yaml, (t) => {
        const r = readReview(t);
        wellFormed(r.diagnostics);
        expect(r.config !== undefined || r.diagnostics.some((d) => d.severity === 'error')).toBe(true);
      }),
      opts(),
    );
  });
  it('readDataFile for every chart family on CSV-shaped text with its own header', () => {
    const headers: Record<string, string> = { measurements: 'date,value', proportion: 'date,defectives,inspected', count: 'date,count', rate: 'date,count,exposure', gap: 'date,between', interval: 'date' };
    fc.assert(
      fc.property(fc.constantFrom(...CHART_IDS, 'auto' as const), csvText, (chart, body) => {
        const kind = chart === 'auto' ? 'count' : ({ individuals: 'measurements', 'xbar-r': 'measurements', 'xbar-s': 'measurements', p: 'proportion', np: 'proportion', 'laney-p': 'proportion', c: 'count', u: 'rate', 'laney-u': 'rate', g: 'gap', t: 'interval' } as const)[chart];
        const r = readDataFile(`${headers[kind]}\n${body}`, { id: 'a', name: 'A', chart, data: 'a.csv', unit: '', better: chart === 'g' || chart === 't' ? 'higher' : 'lower', safety: false, tags: [] }, '2026-12-31');
        wellFormed(r.diagnostics);
      }),
      opts(),
    );
  });
});

/** A workspace in memory: one characteristic of a generated family, numbers from tame to hostile, a generated ledger. */
const workspace = fc.record({
  chart: fc.constantFrom(...CHART_IDS, 'auto' as const),
  n: fc.integer({ min: 0, max: 40 }),
  scale: fc.constantFrom(1, 1e-9, 1e9, 0),
  noise: fc.array(fc.oneof(fc.double({ min: -3, max: 3, noNaN: true }), fc.constant(0)), { minLength: 40, maxLength: 40 }),
  counts: fc.array(fc.nat({ max: 50 }), { minLength: 40, maxLength: 40 }),
  size: fc.array(fc.integer({ min: 1, max: 100000 }), { minLength: 40, maxLength: 40 }),
  rules: fc.constantFrom('western-electric', 'nelson', '[beyond-limits, trend-6, alternating-14]'),
  ledger: fc.array(
    fc.record({
      day: fc.integer({ min: 0, max: 60 }),
      action: fc.constantFrom('baseline', 'freeze', 'exclude', 'include', 'change', 'reviewed', 'note', 'bogus'),
      point: fc.integer({ min: -2, max: 45 }),
      reason: fc.constantFrom('', 'Cause found', '=HYPERLINK("x")'),
    }),
    { maxLength: 8 },
  ),
  garbage: fc.option(fc.tuple(fc.nat({ max: 39 }), cell), { nil: undefined }),
});

const day = (i: number) => new Date(Date.UTC(2026, 0, 1 + i)).toISOString().slice(0, 10);

type Generated = typeof workspace extends fc.Arbitrary<infer T> ? T : never;

function files(w: Generated) {
  const { chart, n, scale, noise, counts, size } = w;
  const rows: string[] = [];
  for (let i = 0; i < n; i++) {
    const v = 10 * scale + noise[i]! * scale;
    switch (chart) {
      case 'individuals':
        rows.push(`${day(i)},${v}`);
        break;
      case 'xbar-r':
      case 'xbar-s':
        for (let j = 0; j < 1 + (size[i]! % 6); j++) rows.push(`${day(i)},${v + j * noise[(i + j) % 40]!}`);
        break;
      case 'p':
      case 'np':
      case 'laney-p':
        rows.push(`${day(i)},${Math.min(counts[i]!, size[i]!)},${size[i]}`);
        break;
      case 'u':
      case 'laney-u':
        rows.push(`${day(i)},${counts[i]},${size[i]! / 1000}`);
        break;
      case 'g':
        rows.push(`${day(i)},${counts[i]}`);
        break;
      case 't':
        rows.push(`${day(i + counts[i]!)}`);
        break;
      default:
        rows.push(`${day(i)},${counts[i]! % 5}`);
    }
  }
  const g = w.garbage;
  if (g && rows.length) rows[g[0] % rows.length] = `${rows[g[0] % rows.length]!.split(',')[0]},${JSON.stringify(g[1])}`;
  const headers: Record<string, string> = { individuals: 'date,value', 'xbar-r': 'date,value', 'xbar-s': 'date,value', p: 'date,defectives,inspected', np: 'date,defectives,inspected', 'laney-p': 'date,defectives,inspected', u: 'date,count,exposure', 'laney-u': 'date,count,exposure', g: 'date,between', t: 'date' };
  const header = headers[chart] ?? 'date,count';
  const ledger = w.ledger
    .slice()
    .sort((a, b) => a.day - b.day)
    .map((e) => `${day(e.day)},a,${e.action},${e.point < 0 ? '' : day(e.point)},"${e.reason.replace(/"/g, '""')}",F`);
  return {
    review: `title: Fuzz\nperiod: {from: ${day(20)}, to: ${day(45)}}\nrules: ${w.rules}\ncharacteristics:\n  - {id: a, name: A, chart: ${chart}, data: a.csv, better: ${chart === 'g' || chart === 't' ? 'higher' : 'lower'}, spec: {lower: ${5 * scale}, upper: ${15 * scale}}}\n`,
    data: `${header}\n${rows.join('\n')}\n`,
    ledger: `date,characteristic,action,point,reason,by\n${ledger.join('\n')}\n`,
  };
}

describe('the whole analysis on generated workspaces', () => {
  it('never throws; a characteristic not assessed carries an error saying why; summary.json is JSON', () => {
    fc.assert(
      fc.property(workspace, (w) => {
        const f = files(w);
        const review = readReview(f.review);
        wellFormed(review.diagnostics);
        if (!review.config) return;
        const c = review.config.characteristics[0]!;
        const data = readDataFile(f.data, c, review.config.period.to);
        const ledger = readLedger(f.ledger, new Set(['a']));
        const inside = data.samples.filter((s) => s.date <= review.config!.period.to);
        const later = new Set(data.samples.filter((s) => s.date > review.config!.period.to).map((s) => s.label));
        const a = analyse({
          config: review.config,
          characteristic: data.characteristic,
          samples: inside,
          laterLabels: later,
          ledger: ledger.entries,
          ledgerFile: 'ledger.csv',
          diagnostics: [...data.diagnostics, ...ledger.diagnostics],
          asOf: review.config.period.to,
        });
        wellFormed(a.diagnostics);
        if (a.status !== 'assessed') expect(a.diagnostics.some((d) => d.severity === 'error')).toBe(true);
        const summary = summaryOf(review.config, [a], [], review.config.period.to);
        expect(() => JSON.parse(JSON.stringify(summary))).not.toThrow();
        const points = summary.characteristics[0]!.points;
        if (a.status === 'assessed') for (let i = 0; i < points.length; i++) expect(Number.isFinite(points.at(i)!.value), `${c.chart} value`).toBe(true);
      }),
      opts(),
    );
  });
});

describe('the whole build, with every renderer, on generated workspaces written to disk', () => {
  const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-fuzz-'));
  afterAll(() => rmSync(temp, { recursive: true, force: true }));
  let k = 0;
  it('planPack never throws; every output is there; summary.json and manifest.json parse', async () => {
    await fc.assert(
      fc.asyncProperty(workspace, async (w) => {
        const f = files(w);
        const ws = path.join(temp, `w${k++}`);
        mkdirSync(ws);
        writeFileSync(path.join(ws, 'review.yaml'), f.review);
        writeFileSync(path.join(ws, 'a.csv'), f.data);
        writeFileSync(path.join(ws, 'ledger.csv'), f.ledger);
        const loaded = loadWorkspace(ws);
        if (!loaded.ok) return void wellFormed(loaded.diagnostics);
        const plan = await planPack(loaded.workspace, loaded.workspace.config.period.to);
        for (const name of ['index.md', 'index.html', 'pack.pdf', 'summary.json', 'manifest.json']) expect(plan.files.has(name), name).toBe(true);
        JSON.parse(new TextDecoder().decode(plan.files.get('summary.json')));
        JSON.parse(new TextDecoder().decode(plan.files.get('manifest.json')));
        rmSync(ws, { recursive: true, force: true });
      }),
      opts(0.05),
    );
    // 500 whole builds in the full run take minutes on two cores.
  }, 1_200_000);
});

export { files, workspace };
