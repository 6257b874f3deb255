/**
 * European CSVs: `csv: {delimiter: ';', decimal: ','}` in review.yaml, for
 * the whole workspace or one characteristic. The expected values are the
 * numbers as written, read by hand.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { planSummary } from '../../src/assess.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { readReview } from '../../src/workspace/review-file.ts';

const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-euro-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

const VALUES = ['10,2', '9,8', '10,1', '9,9', '10,4', '10', '9,7'];
const EURO = `date;value\n${VALUES.map((v, i) => `2026-01-0${i + 1};${v}`).join('\n')}\n`;
const PLAIN = `date,value\n${VALUES.map((v, i) => `2026-01-0${i + 1},${v.replace(',', '.')}`).join('\n')}\n`;

function workspace(name: string, yaml: string, files: Record<string, string>) {
  const ws = path.join(temp, name);
  mkdirSync(path.join(ws, 'data'), { recursive: true });
  writeFileSync(path.join(ws, 'review.yaml'), yaml);
  for (const [f, t] of Object.entries(files)) writeFileSync(path.join(ws, f), t);
  return ws;
}
const head = 'title: T\nperiod: {from: 2026-01-01, to: 2026-01-31}\n';
const item = (id: string, extra = '') => `  - {id: ${id}, name: ${id}, chart: individuals, data: data/${id}.csv, better: target${extra}}\n`;

describe('csv: delimiter and decimal mark', () => {
  it('for the whole workspace: semicolons and decimal commas read as the numbers written', () => {
    const ws = workspace('all', `${head}csv: {delimiter: ";", decimal: ","}\ncharacteristics:\n${item('a')}`, { 'data/a.csv': EURO });
    const loaded = loadWorkspace(ws);
    if (!loaded.ok) throw new Error('did not load');
    const plan = planSummary(loaded.workspace, '2026-01-31');
    expect(plan.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    const a = plan.assessments[0]!;
    if (a.status !== 'assessed') throw new Error('not assessed');
    expect(a.location.values).toEqual([10.2, 9.8, 10.1, 9.9, 10.4, 10, 9.7]);
  });
  it('for one characteristic, beside a plain one', () => {
    const ws = workspace('one', `${head}characteristics:\n${item('a', ', csv: {delimiter: ";", decimal: ","}')}${item('b')}`, { 'data/a.csv': EURO, 'data/b.csv': PLAIN });
    const loaded = loadWorkspace(ws);
    if (!loaded.ok) throw new Error('did not load');
    const [a, b] = planSummary(loaded.workspace, '2026-01-31').assessments;
    if (a?.status !== 'assessed' || b?.status !== 'assessed') throw new Error('not assessed');
    expect(a.location.values).toEqual(b.location.values);
  });
  it('a point in a decimal-comma file is refused on its line, not guessed at', () => {
    const ws = workspace('point', `${head}csv: {delimiter: ";", decimal: ","}\ncharacteristics:\n${item('a')}`, { 'data/a.csv': EURO.replace('9,9', '9.9') });
    const loaded = loadWorkspace(ws);
    if (!loaded.ok) throw new Error('did not load');
    const d = planSummary(loaded.workspace, '2026-01-31').diagnostics.filter((x) => x.severity === 'error');
    expect(d.map((x) => [x.file, x.line, x.ruleId])).toEqual([['data/a.csv', 5, 'data/not-a-number']]);
    expect(d[0]!.message).toMatch(/"9\.9" has a point, but this file's decimal mark is a comma/);
  });
  it('a European file read with the default settings says on its header line which setting it needs', () => {
    const ws = workspace('default', `${head}characteristics:\n${item('a')}`, { 'data/a.csv': EURO });
    const loaded = loadWorkspace(ws);
    if (!loaded.ok) throw new Error('did not load');
    const d = planSummary(loaded.workspace, '2026-01-31').diagnostics.filter((x) => x.severity === 'error');
    expect(d.map((x) => [x.file, x.line, x.ruleId])).toEqual([['data/a.csv', 1, 'csv/delimiter']]);
    expect(d[0]!.message).toMatch(/separates its fields with ";", not ","\. Set csv: \{delimiter: ";", decimal: ","\}/);
  });
  it('a comma cannot be both delimiter and decimal mark', () => {
    const r = readReview(`${head}csv: {decimal: ","}\ncharacteristics:\n${item('a')}`);
    expect(r.diagnostics.map((d) => [d.ruleId, d.line])).toEqual([['review/csv', 3]]);
    expect(r.diagnostics[0]!.message).toMatch(/use delimiter: ";"/);
  });
  it('an unknown delimiter lists the allowed ones', () => {
    const r = readReview(`${head}characteristics:\n${item('a', ', csv: {delimiter: "#"}')}`);
    expect(r.diagnostics[0]!.message).toMatch(/"characteristics\[0\]\.csv\.delimiter" must be one of "," ";"/);
  });
});
