/**
 * Malformed input: each case breaks one thing in an otherwise good workspace
 * and asserts the diagnostic names the right file and line and says what is
 * wrong. review.yaml problems stop the build; data and ledger problems stop
 * only the characteristic they belong to.
 */
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { planSummary } from '../../src/assess.ts';
import type { Diagnostic } from '../../src/diagnostics.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';

const REVIEW = `title: Malformed cases
period: {from: 2026-01-01, to: 2026-12-31}
characteristics:
  - id: a
    name: A
    chart: individuals
    data: data/a.csv
    better: target
  - id: b
    name: B
    chart: p
    data: data/b.csv
    better: lower
`;
const A = 'date,value\n' + Array.from({ length: 8 }, (_, i) => `2026-01-0${i + 1},${10 + (i % 2)}`).join('\n') + '\n';
const B = 'date,defectives,inspected\n' + Array.from({ length: 8 }, (_, i) => `2026-01-0${i + 1},${2 + (i % 2)},100`).join('\n') + '\n';
const LEDGER = 'date,characteristic,action,point,reason,by\n';

const roots: string[] = [];
afterAll(() => roots.forEach((r) => rmSync(r, { recursive: true, force: true })));

function run(files: Record<string, string>) {
  const root = mkdtempSync(path.join(tmpdir(), 'plumbline-bad-'));
  roots.push(root);
  const all = { 'review.yaml': REVIEW, 'data/a.csv': A, 'data/b.csv': B, 'ledger.csv': LEDGER, ...files };
  for (const [name, text] of Object.entries(all)) {
    mkdirSync(path.dirname(path.join(root, name)), { recursive: true });
    writeFileSync(path.join(root, name), text);
  }
  const loaded = loadWorkspace(root);
  if (!loaded.ok) return { stopped: true, diagnostics: loaded.diagnostics, assessed: [] as string[] };
  const plan = planSummary(loaded.workspace, '2026-12-31');
  return {
    stopped: false,
    diagnostics: plan.diagnostics,
    assessed: plan.assessments.filter((a) => a.status === 'assessed').map((a) => a.characteristic.id),
  };
}

interface Case {
  name: string;
  files: Record<string, string>;
  file: string;
  line: number;
  rule: string;
  message: RegExp;
  /** review.yaml problems stop everything; others leave the other characteristic assessed. */
  stops?: boolean;
  /** The characteristic that cannot be assessed. */
  broken?: string;
}

const ledger = (...rows: string[]) => LEDGER + rows.join('\n') + '\n';
const aWith = (row: number, text: string) => {
  const lines = A.trimEnd().split('\n');
  lines[row] = text;
  return lines.join('\n') + '\n';
};

const CASES: Case[] = [
  // review.yaml
  { name: 'YAML syntax error', files: { 'review.yaml': 'title: [unclosed\nperiod: x\n' }, file: 'review.yaml', line: 2, rule: 'yaml/syntax', message: /YAML cannot be read/, stops: true },
  { name: 'missing title', files: { 'review.yaml': REVIEW.replace('title: Malformed cases\n', '') }, file: 'review.yaml', line: 1, rule: 'review/missing-field', message: /"title" is missing/, stops: true },
  { name: 'unknown field', files: { 'review.yaml': REVIEW.replace('    better: target\n', '    better: target\n    colour: red\n') }, file: 'review.yaml', line: 9, rule: 'review/unknown-field', message: /Unknown field "characteristics\[0\]\.colour"/, stops: true },
  { name: 'unknown chart family', files: { 'review.yaml': REVIEW.replace('chart: individuals', 'chart: xmr') }, file: 'review.yaml', line: 6, rule: 'review/invalid', message: /"xmr" is not a chart family; use one of individuals/, stops: true },
  { name: 'bad better', files: { 'review.yaml': REVIEW.replace('better: target', 'better: up') }, file: 'review.yaml', line: 8, rule: 'review/invalid', message: /must be higher, lower or target/, stops: true },
  { name: 'bad id', files: { 'review.yaml': REVIEW.replace('id: a', 'id: Fill Volume') }, file: 'review.yaml', line: 4, rule: 'review/invalid', message: /lower-case letters, digits and hyphens/, stops: true },
  { name: 'duplicate id', files: { 'review.yaml': REVIEW.replace('id: b', 'id: a') }, file: 'review.yaml', line: 9, rule: 'review/duplicate-id', message: /used twice/, stops: true },
  { name: 'impossible period date', files: { 'review.yaml': REVIEW.replace('to: 2026-12-31', 'to: 2026-02-30') }, file: 'review.yaml', line: 2, rule: 'review/invalid', message: /"period\.to" must be a real date/, stops: true },
  { name: 'period reversed', files: { 'review.yaml': REVIEW.replace('from: 2026-01-01', 'from: 2027-01-01') }, file: 'review.yaml', line: 2, rule: 'review/period-reversed', message: /before period\.from/, stops: true },
  { name: 'data path outside the workspace', files: { 'review.yaml': REVIEW.replace('data: data/a.csv', 'data: ../elsewhere/a.csv') }, file: 'review.yaml', line: 7, rule: 'review/data-outside', message: /leads outside the workspace/, stops: true },
  { name: 'absolute data path', files: { 'review.yaml': REVIEW.replace('data: data/a.csv', 'data: /etc/passwd') }, file: 'review.yaml', line: 7, rule: 'review/data-outside', message: /outside the workspace/, stops: true },
  { name: 'unknown rule id', files: { 'review.yaml': REVIEW.replace('period:', 'rules: [beyond-limits, test-9]\nperiod:') }, file: 'review.yaml', line: 2, rule: 'review/invalid', message: /rule ids from: beyond-limits/, stops: true },
  { name: 'standard without sigma on a variables chart', files: { 'review.yaml': REVIEW.replace('    better: target\n', '    better: target\n    standard: {center: 10}\n') }, file: 'review.yaml', line: 9, rule: 'review/standard', message: /needs center and a positive sigma/, stops: true },
  { name: 'minPoints too small', files: { 'review.yaml': REVIEW.replace('period:', 'minPoints: 1\nperiod:') }, file: 'review.yaml', line: 2, rule: 'review/invalid', message: /"minPoints" must be at least 2/, stops: true },
  // data CSVs
  { name: 'missing column', files: { 'data/a.csv': A.replace('date,value', 'date,val') }, file: 'data/a.csv', line: 1, rule: 'data/missing-column', message: /Column "value" is missing/, broken: 'a' },
  { name: 'unknown column', files: { 'data/a.csv': A.replace('date,value', 'date,value,shift').replace(/\n(\d)/g, '\n$1').split('\n').map((l, i) => (i > 0 && l ? `${l},x` : l)).join('\n') }, file: 'data/a.csv', line: 1, rule: 'data/unknown-column', message: /Column "shift" is not read by a individuals chart/, broken: 'a' },
  { name: 'duplicated header', files: { 'data/a.csv': A.replace('date,value', 'date,value,value').split('\n').map((l, i) => (i > 0 && l ? `${l},1` : l)).join('\n') }, file: 'data/a.csv', line: 1, rule: 'csv/duplicate-column', message: /appears twice/, broken: 'a' },
  { name: 'non-numeric value', files: { 'data/a.csv': aWith(3, '2026-01-03,12 mm') }, file: 'data/a.csv', line: 4, rule: 'data/not-a-number', message: /"12 mm" is not a number/, broken: 'a' },
  { name: 'NaN', files: { 'data/a.csv': aWith(2, '2026-01-02,NaN') }, file: 'data/a.csv', line: 3, rule: 'data/not-a-number', message: /"NaN" is not a number/, broken: 'a' },
  { name: '1e999 overflows', files: { 'data/a.csv': aWith(2, '2026-01-02,1e999') }, file: 'data/a.csv', line: 3, rule: 'data/not-a-number', message: /too large to be a finite number/, broken: 'a' },
  { name: 'empty value', files: { 'data/a.csv': aWith(5, '2026-01-05,') }, file: 'data/a.csv', line: 6, rule: 'data/not-a-number', message: /"value" is empty/, broken: 'a' },
  { name: 'date in another format', files: { 'data/a.csv': aWith(4, '04/01/2026,10') }, file: 'data/a.csv', line: 5, rule: 'data/bad-date', message: /not a date in the form YYYY-MM-DD/, broken: 'a' },
  { name: 'date with a time zone', files: { 'data/a.csv': aWith(4, '2026-01-04T08:00:00Z,10') }, file: 'data/a.csv', line: 5, rule: 'data/bad-date', message: /carries a time/, broken: 'a' },
  { name: 'dates out of order', files: { 'data/a.csv': aWith(6, '2026-01-02,10') }, file: 'data/a.csv', line: 7, rule: 'data/date-order', message: /rows must be in date order/, broken: 'a' },
  { name: 'duplicate point', files: { 'data/a.csv': aWith(4, '2026-01-03,10') }, file: 'data/a.csv', line: 5, rule: 'data/duplicate-point', message: /appears again \(first at line 4\)/, broken: 'a' },
  { name: 'negative count', files: { 'data/b.csv': B.replace('2026-01-03,2,100', '2026-01-03,-2,100') }, file: 'data/b.csv', line: 4, rule: 'data/out-of-range', message: /cannot be negative/, broken: 'b' },
  { name: 'defectives above inspected', files: { 'data/b.csv': B.replace('2026-01-04,3,100', '2026-01-04,300,100') }, file: 'data/b.csv', line: 5, rule: 'data/out-of-range', message: /defectives cannot exceed inspected/, broken: 'b' },
  { name: 'zero inspected', files: { 'data/b.csv': B.replace('2026-01-05,2,100', '2026-01-05,0,0') }, file: 'data/b.csv', line: 6, rule: 'data/out-of-range', message: /at least one unit must be inspected/, broken: 'b' },
  { name: 'fractional count', files: { 'data/b.csv': B.replace('2026-01-02,3,100', '2026-01-02,2.5,100') }, file: 'data/b.csv', line: 3, rule: 'data/out-of-range', message: /whole number/, broken: 'b' },
  { name: 'row with too many fields', files: { 'data/a.csv': aWith(2, '2026-01-02,10,11') }, file: 'data/a.csv', line: 3, rule: 'csv/row-length', message: /3 fields; the header has 2/, broken: 'a' },
  { name: 'unclosed quote', files: { 'data/a.csv': aWith(3, '2026-01-03,"10') }, file: 'data/a.csv', line: 4, rule: 'csv/syntax', message: /never closed/, broken: 'a' },
  { name: 'empty file', files: { 'data/a.csv': '' }, file: 'data/a.csv', line: 1, rule: 'csv/empty', message: /needs a header row/, broken: 'a' },
  { name: 'UTF-16 file', files: { 'data/a.csv': Buffer.from(A, 'utf16le').toString('latin1') }, file: 'data/a.csv', line: 1, rule: 'csv/not-text', message: /not UTF-8 text/, broken: 'a' },
  // ledger.csv
  { name: 'ledger: unknown characteristic', files: { 'ledger.csv': ledger('2026-01-09,zz,note,,hello,QA') }, file: 'ledger.csv', line: 2, rule: 'ledger/unknown-characteristic', message: /No characteristic "zz"/ },
  { name: 'ledger: unknown point', files: { 'ledger.csv': ledger('2026-01-09,a,exclude,2026-03-01,Gauge dropped,QA') }, file: 'ledger.csv', line: 2, rule: 'ledger/unknown-point', message: /no point labelled "2026-03-01"/, broken: 'a' },
  { name: 'ledger: unknown action', files: { 'ledger.csv': ledger('2026-01-09,a,lock,2026-01-05,Stable,QA') }, file: 'ledger.csv', line: 2, rule: 'ledger/unknown-action', message: /"lock" is not a ledger action/, broken: 'a' },
  { name: 'ledger: missing reason', files: { 'ledger.csv': ledger('2026-01-09,a,exclude,2026-01-05,,QA') }, file: 'ledger.csv', line: 2, rule: 'ledger/missing-reason', message: /needs a reason/, broken: 'a' },
  { name: 'ledger: rows out of date order', files: { 'ledger.csv': ledger('2026-01-09,a,note,,one,QA', '2026-01-08,a,note,,two,QA') }, file: 'ledger.csv', line: 3, rule: 'ledger/date-order', message: /order decisions were taken/, broken: 'a' },
  { name: 'ledger: freeze before minPoints usable points', files: { 'ledger.csv': ledger('2026-01-09,a,freeze,2026-01-03,Early,QA') }, file: 'ledger.csv', line: 2, rule: 'ledger/freeze-too-early', message: /rest on 3 usable points; at least 5/, broken: 'a' },
  { name: 'ledger: exclusions leave too few points for a freeze', files: { 'ledger.csv': ledger('2026-01-09,a,exclude,2026-01-02,Cause A,QA', '2026-01-09,a,freeze,2026-01-05,Stable,QA') }, file: 'ledger.csv', line: 3, rule: 'ledger/freeze-too-early', message: /rest on 4 usable points/, broken: 'a' },
  { name: 'ledger: excluded twice', files: { 'ledger.csv': ledger('2026-01-09,a,exclude,2026-01-02,Cause A,QA', '2026-01-10,a,exclude,2026-01-02,Cause B,QA') }, file: 'ledger.csv', line: 3, rule: 'ledger/contradiction', message: /already excluded \(line 2\)/, broken: 'a' },
  { name: 'ledger: include without exclude', files: { 'ledger.csv': ledger('2026-01-09,a,include,2026-01-02,Back in,QA') }, file: 'ledger.csv', line: 2, rule: 'ledger/contradiction', message: /is not excluded/, broken: 'a' },
  { name: 'ledger: freeze inside an earlier baseline', files: { 'ledger.csv': ledger('2026-01-09,a,baseline,2026-01-04,New tool,QA', '2026-01-10,a,freeze,2026-01-03,Late freeze,QA') }, file: 'ledger.csv', line: 3, rule: 'ledger/contradiction', message: /already closed/, broken: 'a' },
  { name: 'ledger: bad date', files: { 'ledger.csv': ledger('9 Jan 2026,a,note,,hello,QA') }, file: 'ledger.csv', line: 2, rule: 'ledger/bad-date', message: /not a date in the form YYYY-MM-DD/, broken: 'a' },
  { name: 'ledger: missing column', files: { 'ledger.csv': 'date,characteristic,action,point,reason\n' }, file: 'ledger.csv', line: 1, rule: 'ledger/missing-column', message: /Column "by" is missing/ },
];

describe('malformed input: every problem names its file and line', () => {
  it(`has at least 25 cases (${CASES.length})`, () => expect(CASES.length).toBeGreaterThanOrEqual(25));
  for (const c of CASES) {
    it(c.name, () => {
      const r = run(c.files);
      const hit = r.diagnostics.find((d: Diagnostic) => d.ruleId === c.rule && d.file === c.file && d.line === c.line);
      expect(hit, `diagnostics: ${JSON.stringify(r.diagnostics, null, 1)}`).toBeDefined();
      expect(hit!.message).toMatch(c.message);
      expect(hit!.severity).toBe('error');
      expect(r.stopped).toBe(c.stops === true);
      if (c.broken) {
        expect(r.assessed).not.toContain(c.broken);
        expect(r.assessed).toHaveLength(1);
      }
    });
  }
});

describe('inputs that look odd but are fine', () => {
  it('a UTF-8 byte-order mark, CRLF line ends and a trailing delimiter are read', () => {
    const text = '\uFEFFdate,value,\r\n' + A.trim().split('\n').slice(1).map((l) => `${l},`).join('\r\n') + '\r\n';
    const r = run({ 'data/a.csv': text });
    expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    expect(r.assessed).toEqual(['a', 'b']);
  });
  it('a quoted label holding a newline is one field, and later line numbers stay right', () => {
    const text = 'label,date,value\n"first\npoint",2026-01-01,10\nsecond,2026-01-02,abc\n';
    const r = run({ 'data/a.csv': text });
    const d = r.diagnostics.find((x) => x.ruleId === 'data/not-a-number')!;
    expect(d.line).toBe(4);
  });
});

describe('data files reached through symbolic links', () => {
  /** A workspace whose data/a.csv is a link to `target` (made by `make`, given the workspace's root). */
  const linked = (make: (root: string) => string) => {
    const root = mkdtempSync(path.join(tmpdir(), 'plumbline-link-'));
    roots.push(root);
    for (const [name, text] of Object.entries({ 'review.yaml': REVIEW, 'data/b.csv': B, 'ledger.csv': LEDGER })) {
      mkdirSync(path.dirname(path.join(root, name)), { recursive: true });
      writeFileSync(path.join(root, name), text);
    }
    symlinkSync(make(root), path.join(root, 'data/a.csv'));
    return loadWorkspace(root);
  };
  it('refuses a link to a file outside the workspace, naming review.yaml\'s line, and takes one inside it', () => {
    const outside = mkdtempSync(path.join(tmpdir(), 'plumbline-outside-'));
    roots.push(outside);
    writeFileSync(path.join(outside, 'a.csv'), A);
    const out = linked(() => path.join(outside, 'a.csv'));
    expect(out.ok).toBe(false);
    const d = out.ok ? undefined : out.diagnostics[0];
    expect([d?.ruleId, d?.file, d?.line]).toEqual(['review/data-outside', 'review.yaml', 7]);
    expect(d?.message).toMatch(/is a link to a file outside the workspace/);
    // A link to a file inside the workspace (here, through a relative link) is read as that file.
    const inside = linked((root) => {
      writeFileSync(path.join(root, 'kept-a.csv'), A);
      return '../kept-a.csv';
    });
    expect(inside.ok).toBe(true);
  });
});
