/**
 * The monthly cycle through the real CLI: init a workspace, check and build
 * it, record decisions with `ledger add` and `ledger accept`, rebuild and
 * read "Since the last review"; --json, --version and --help everywhere.
 * What a command must not touch is checked by hashing the files around it.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../src/cli.ts';
import { printDiagnostics } from '../src/commands/common.ts';
import { error } from '../src/diagnostics.ts';

const ROOT = path.join(import.meta.dirname, '..');
const BIN = path.join(ROOT, 'bin/plumbline.mjs');
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-cycle-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

function cli(...args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '' }, input: '' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}
const sha = (file: string) => createHash('sha256').update(readFileSync(file)).digest('hex');

describe('init', () => {
  const ws = path.join(temp, 'starter');
  it('creates a workspace that check and build accept at once', () => {
    const r = cli('init', ws);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Created .*review\.yaml, 5 data files and an empty ledger\.csv/);
    expect(readFileSync(path.join(ws, 'ledger.csv'), 'utf8')).toBe('date,characteristic,action,point,reason,by\n');
    const yaml = readFileSync(path.join(ws, 'review.yaml'), 'utf8');
    for (const field of ['title:', 'organisation:', 'period:', 'rules:', 'minPoints:', 'freezeAfter:', 'characteristics:']) {
      const line = yaml.split('\n').findIndex((l) => l.startsWith(field));
      expect(yaml.split('\n')[line - 1], `a comment above ${field}`).toMatch(/^#/);
    }
    expect(cli('check', ws).code).toBe(0);
    const built = cli('build', ws, '--out', path.join(temp, 'starter-pack'));
    expect(built.code).toBe(0);
    expect(built.out).toMatch(/Built 5 characteristics/);
  });
  it('refuses a folder that already holds files, and changes nothing in it', () => {
    const before = sha(path.join(ws, 'review.yaml'));
    const r = cli('init', ws);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/is not empty/);
    expect(sha(path.join(ws, 'review.yaml'))).toBe(before);
  });
});

describe('ledger add', () => {
  const ws = path.join(temp, 'add');
  cpSync(path.join(ROOT, 'data/demo'), ws, { recursive: true });
  // A ledger written on Windows: CRLF line ends that must survive.
  const original = readFileSync(path.join(ws, 'ledger.csv'), 'utf8').replace(/\n/g, '\r\n');
  writeFileSync(path.join(ws, 'ledger.csv'), original);
  it('appends a valid row after the existing ones, byte for byte, in the file’s own line ends', () => {
    const r = cli('ledger', ws, 'add', '--characteristic', 'carbonation', '--action', 'note', '--reason', 'Tank supplier changed, no effect expected', '--by', 'M. Silva', '--date', '2026-12-01');
    expect(r.code).toBe(0);
    const now = readFileSync(path.join(ws, 'ledger.csv'), 'utf8');
    expect(now.startsWith(original)).toBe(true);
    expect(now.slice(original.length)).toBe('2026-12-01,carbonation,note,,"Tank supplier changed, no effect expected",M. Silva\r\n');
  });
  it('refuses a row build would reject — an unknown point, an earlier date, a missing reason — naming the line, and writes nothing', () => {
    const before = sha(path.join(ws, 'ledger.csv'));
    const cases: [string[], RegExp][] = [
      [['--characteristic', 'carbonation', '--action', 'exclude', '--point', '2031-01-01', '--reason', 'x', '--date', '2026-12-02'], /has no point labelled "2031-01-01"/],
      [['--characteristic', 'carbonation', '--action', 'note', '--reason', 'late', '--date', '2026-01-01'], /is earlier than 2026-12-01/],
      [['--characteristic', 'carbonation', '--action', 'exclude', '--point', '2026-11-10', '--date', '2026-12-02'], /reason/i],
    ];
    for (const [args, message] of cases) {
      const r = cli('ledger', ws, 'add', ...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err).toMatch(/^ledger\.csv:\d+/m);
      expect(r.err).toMatch(message);
      expect(r.err).toMatch(/Nothing was appended/);
    }
    expect(sha(path.join(ws, 'ledger.csv'))).toBe(before);
  });
  it('suggests the action meant by a misspelling', () => {
    const r = cli('ledger', ws, 'add', '--characteristic', 'carbonation', '--action', 'frezee', '--point', '2026-11-30');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/did you mean freeze\?/);
  });
});

describe('ledger accept and the rebuild that follows', () => {
  const ws = path.join(temp, 'accept');
  const pack = path.join(temp, 'accept-pack');
  cpSync(path.join(ROOT, 'data/demo'), ws, { recursive: true });
  it('without a terminal it asks for --yes instead of appending', () => {
    expect(cli('build', ws, '--out', pack).code).toBe(0);
    const r = cli('ledger', ws, 'accept', '--from', pack);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/pass --yes/);
  });
  it('appends exactly the lines the build proposed for --only, with --by filled in', () => {
    const summary = JSON.parse(readFileSync(path.join(pack, 'summary.json'), 'utf8'));
    const proposed: string = summary.characteristics.find((c: { id: string }) => c.id === 'fill-volume').recommendation.ledger[0];
    const before = readFileSync(path.join(ws, 'ledger.csv'), 'utf8');
    const r = cli('ledger', ws, 'accept', '--from', pack, '--only', 'fill-volume', '--by', 'R. Okafor', '--yes');
    expect(r.code).toBe(0);
    expect(readFileSync(path.join(ws, 'ledger.csv'), 'utf8')).toBe(`${before}${proposed}R. Okafor\n`);
  });
  it('on a terminal it shows each proposed line and appends only those answered yes', async () => {
    const ws2 = path.join(temp, 'ask');
    cpSync(path.join(ROOT, 'data/demo'), ws2, { recursive: true });
    const before = readFileSync(path.join(ws2, 'ledger.csv'), 'utf8');
    const shown: string[] = [];
    const answers = ['y', 'n', 'n', 'n', 'n'];
    const questions: string[] = [];
    const code = await main(['ledger', ws2, 'accept', '--from', pack], {
      out: (l) => shown.push(l),
      err: (l) => shown.push(l),
      ask: async (q) => (questions.push(q), answers[questions.length - 1] ?? 'n'),
    });
    expect(code).toBe(0);
    // One question per line the build proposed (every characteristic whose action carries a ledger line).
    const summary = JSON.parse(readFileSync(path.join(pack, 'summary.json'), 'utf8'));
    const proposed: string[] = summary.characteristics.flatMap((c: { recommendation: { ledger: string[] } | null }) => c.recommendation?.ledger ?? []);
    expect(questions).toHaveLength(proposed.length);
    expect(shown.slice(0, 1)).toEqual([proposed[0]]);
    expect(readFileSync(path.join(ws2, 'ledger.csv'), 'utf8')).toBe(`${before}${proposed[0]}\n`);
  });
  it('refuses proposals from a pack built before the ledger changed', () => {
    const r = cli('ledger', ws, 'accept', '--from', pack, '--yes');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/ledger\.csv has changed since/);
  });
  it('compares through the previous pack\'s record.json, or through its summary.json when it has none, to the same pack', () => {
    // Two copies of last month's pack: one as an older version wrote it (no record.json), one whose
    // summary.json is unreadable, so that only its record.json can have been read.
    const older = path.join(temp, 'accept-pack-older');
    const recordOnly = path.join(temp, 'accept-pack-record');
    cpSync(pack, older, { recursive: true });
    rmSync(path.join(older, 'record.json'));
    cpSync(pack, recordOnly, { recursive: true });
    writeFileSync(path.join(recordOnly, 'summary.json'), 'not JSON');
    const [a, b] = [path.join(temp, 'via-summary'), path.join(temp, 'via-record')];
    expect(cli('build', ws, '--out', a, '--previous', older).code).toBe(0);
    expect(cli('build', ws, '--out', b, '--previous', recordOnly).code).toBe(0);
    for (const f of ['index.md', 'index.html', 'pack.pdf', 'record.json']) expect(sha(path.join(b, f)), f).toBe(sha(path.join(a, f)));
    expect(readFileSync(path.join(b, 'index.md'), 'utf8')).toMatch(/freeze → keep/);
    // The record is the small part of the summary the comparison reads.
    expect(readFileSync(path.join(pack, 'record.json')).length * 10).toBeLessThan(readFileSync(path.join(pack, 'summary.json')).length);
  });
  it('the rebuild compares itself with the pack already in --out: the freeze, the moved action and the new ledger row', () => {
    const r = cli('build', ws, '--out', pack);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Compared with the pack built for 2026-11-30/);
    const md = readFileSync(path.join(pack, 'index.md'), 'utf8');
    const since = md.slice(md.indexOf('## Since the last review'), md.indexOf('## Contents'));
    expect(since).toMatch(/\[Fill volume, line 1\]\(#c-fill-volume\): freeze → keep/);
    expect(since).toMatch(/freeze at "2026-11-30" — Trial limits stable over 41 usable points \(R\. Okafor\)/);
    expect(since).toMatch(/No new signals\./);
  });
  it('--previous must point at a pack', () => {
    const r = cli('build', ws, '--out', path.join(temp, 'other'), '--previous', ws);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/holds no record\.json or summary\.json/);
  });
});

describe('CLI conventions', () => {
  it('--json on check and build prints one JSON document on stdout and nothing else', () => {
    const c = cli('check', path.join(ROOT, 'data/demo'), '--json');
    expect(c.code).toBe(0);
    const j = JSON.parse(c.out);
    expect(j.command).toBe('check');
    // review.yaml lists every characteristic with one `- id:` line.
    expect(j.characteristics).toHaveLength(readFileSync(path.join(ROOT, 'data/demo/review.yaml'), 'utf8').match(/^  - id: /gm)!.length);
    expect(j.characteristics.find((x: { id: string }) => x.id === 'fill-volume').action).toBe('freeze');
    const b = cli('build', path.join(ROOT, 'data/demo'), '--out', path.join(temp, 'json-pack'), '--json');
    const jb = JSON.parse(b.out);
    expect(jb.exitCode).toBe(0);
    expect(jb.files).toContain('pack.pdf');
    expect(b.err).toBe('');
  });
  it('--version and --help work after any command', () => {
    const pkg = JSON.parse(readFileSync(path.join(ROOT, 'package.json'), 'utf8'));
    for (const cmd of ['init', 'check', 'build', 'ledger']) {
      expect(cli(cmd, '--version').out.trim()).toBe(pkg.version);
      expect(cli(cmd, '--help').out).toMatch(/Usage/);
    }
    expect(cli('--help').out).toMatch(/plumbline ledger <workspace> accept/);
  });
  it('colours diagnostics only when asked (a terminal without NO_COLOR), never in a pipe', () => {
    const lines: string[] = [];
    const d = [error('csv/not-a-number', { file: 'data/a.csv', line: 3 }, 'Not a number.')];
    printDiagnostics({ out: () => {}, err: (l) => lines.push(l), color: true }, d, false);
    printDiagnostics({ out: () => {}, err: (l) => lines.push(l) }, d, false);
    expect(lines[0]).toContain('\u001b[31merror\u001b[0m');
    expect(lines[1]).toBe('data/a.csv:3: error Not a number. [csv/not-a-number]');
    // Spawned with a pipe for stderr, the real CLI writes no escape codes.
    expect(cli('check', path.join(temp, 'nowhere')).err).not.toMatch(/\u001b\[/);
  });
});
