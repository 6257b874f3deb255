/** The command line as a user meets it: the real bin, exit codes, what is (not) written, no stack traces for user mistakes. */
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { BIN, ROOT, cli, hashTree } from './helpers/cli.ts';

const FIXTURE = path.join(ROOT, 'test/fixtures/engine');
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-cli-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));


describe('plumbline CLI', () => {
  it('--version prints the package version; --help lists the commands', () => {
    const pkg = JSON.parse(readFileSync(path.join(ROOT, 'package.json'), 'utf8'));
    expect(cli('--version').out.trim()).toBe(pkg.version);
    const help = cli('--help');
    expect(help.code).toBe(0);
    expect(help.out).toMatch(/plumbline check <workspace>/);
    expect(help.out).toMatch(/plumbline build <workspace> --out <dir>/);
    expect(cli('build', '--help').out).toMatch(/--date/);
  });
  it('build writes the whole pack, exits 0, and leaves the inputs as they were', () => {
    const before = hashTree(FIXTURE);
    const out = path.join(temp, 'pack');
    const r = cli('build', FIXTURE, '--out', out);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Built 10 characteristics/);
    // The pack, and the build cache beside it (not part of the pack; see test/build-cache.test.ts).
    expect(readdirSync(out).sort()).toEqual(['.plumbline-cache', 'charts', 'index.html', 'index.md', 'manifest.json', 'pack.pdf', 'record.json', 'summary.json']);
    expect(hashTree(FIXTURE)).toEqual(before);
  });
  it('PLUMBLINE_TIMING=1 prints each stage of a build on stderr, in order, and leaves stdout and the pack as they are', () => {
    const quiet = path.join(temp, 'untimed');
    const timed = path.join(temp, 'timed');
    const plain = cli('build', FIXTURE, '--out', quiet, '-q');
    const r = spawnSync(process.execPath, [BIN, 'build', FIXTURE, '--out', timed, '-q'], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', PLUMBLINE_TIMING: '1' } });
    expect(r.status).toBe(0);
    expect(r.stdout.replace(timed, quiet)).toBe(plain.out);
    expect(plain.err).not.toMatch(/timing:/);
    const stages = [...r.stderr.matchAll(/^timing: (.+?) +(\d+) ms, at (\d+) ms$/gm)];
    const names = stages.map((m) => m[1]);
    for (const stage of ['start and arguments', 'workspace read', 'analysis and summary.json', 'pdf', 'pack written']) expect(names, stage).toContain(stage);
    expect(names.indexOf('workspace read')).toBeLessThan(names.indexOf('pdf'));
    expect(names.at(-1)).toBe('pack written');
    // Each "at" is the time since the process started: it never goes back.
    const at = stages.map((m) => Number(m[3]));
    expect(at).toEqual([...at].sort((a, b) => a - b));
    const packOf = (dir: string) => Object.fromEntries(Object.entries(hashTree(dir)).filter(([f]) => !f.startsWith('.plumbline-cache/')));
    expect(packOf(timed)).toEqual(packOf(quiet));
  });
  it('building twice gives byte-identical files: pack.pdf, index.html, index.md, charts, summary.json, manifest.json', () => {
    const a = path.join(temp, 'twice-a');
    const b = path.join(temp, 'twice-b');
    expect(cli('build', FIXTURE, '--out', a).code).toBe(0);
    expect(cli('build', FIXTURE, '--out', b).code).toBe(0);
    // The pack, not the build cache beside it: the cache records the stamps (inode, modification
    // time) of the files each build wrote, which no two builds share.
    const packOf = (dir: string) => Object.fromEntries(Object.entries(hashTree(dir)).filter(([f]) => !f.startsWith('.plumbline-cache/')));
    const ha = packOf(a);
    const hb = packOf(b);
    expect(Object.keys(ha)).toEqual(expect.arrayContaining(['pack.pdf', 'index.html', 'index.md', 'summary.json', 'manifest.json', 'charts/fill-trial.svg']));
    expect(ha).toEqual(hb);
  });
  it('a characteristic with bad data: exit 1, the rest still built, the problem printed as file:line', () => {
    const ws = path.join(temp, 'bad-data');
    cpSync(FIXTURE, ws, { recursive: true });
    writeFileSync(path.join(ws, 'data/wall.csv'), readFileSync(path.join(ws, 'data/wall.csv'), 'utf8').replace('\n2026-06-15,1.4\n', '\n2026-06-15,abc\n'));
    const out = path.join(temp, 'bad-data-pack');
    const r = cli('build', ws, '--out', out);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/data\/wall\.csv:6:\d+: error Column "value" "abc" is not a number/);
    expect(r.err).not.toMatch(/\bat .*\.ts:\d+/);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    const wall = summary.characteristics.find((c: { id: string }) => c.id === 'wall');
    expect(wall.status).toBe('not-assessed');
    expect(summary.counts.assessed).toBe(9);
  });
  it('a broken review.yaml: exit 2, nothing written, no stack trace', () => {
    const ws = path.join(temp, 'bad-review');
    cpSync(FIXTURE, ws, { recursive: true });
    writeFileSync(path.join(ws, 'review.yaml'), 'title: x\nperiod: {from: 2026-01-01, to: 2026-02-01}\ncharacteristics: []\n');
    const out = path.join(temp, 'bad-review-pack');
    const r = cli('build', ws, '--out', out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/review\.yaml:3:\d+: error "characteristics" must list at least one characteristic/);
    expect(r.err).not.toMatch(/\n\s+at /);
    expect(existsSync(out)).toBe(false);
  });
  it('usage mistakes exit 2 with a hint: unknown command, unknown option, missing --out, --out over the workspace', () => {
    const cmd = cli('buidl', FIXTURE);
    expect(cmd.code).toBe(2);
    expect(cmd.err).toMatch(/did you mean "build"/);
    const opt = cli('build', FIXTURE, '--otu', 'x');
    expect(opt.code).toBe(2);
    expect(opt.err).toMatch(/did you mean --out/);
    expect(cli('build', FIXTURE).err).toMatch(/needs --out/);
    const over = cli('build', FIXTURE, '--out', FIXTURE);
    expect(over.code).toBe(2);
    expect(over.err).toMatch(/is the workspace or a folder that contains it/);
    const paper = cli('build', FIXTURE, '--out', path.join(temp, 'paper'), '--paper', 'a5');
    expect(paper.code).toBe(2);
    expect(paper.err).toMatch(/--paper a5 .*use a4 or letter/);
    expect(existsSync(path.join(temp, 'paper'))).toBe(false);
    const missing = cli('check', path.join(temp, 'nowhere'));
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/review\.yaml does not exist/);
  });
  it('refuses to replace a non-empty folder that is not a pack', () => {
    const out = path.join(temp, 'precious');
    cpSync(path.join(FIXTURE, 'data'), out, { recursive: true });
    const r = cli('build', FIXTURE, '--out', out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/not empty and holds no earlier pack/);
    expect(readdirSync(out)).toContain('torque.csv');
  });
  it('check writes nothing and exits 0 on a good workspace', () => {
    const before = readdirSync(FIXTURE).sort();
    const r = cli('check', FIXTURE);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/No errors; 10 characteristics can be assessed/);
    expect(readdirSync(FIXTURE).sort()).toEqual(before);
  });
  it('--only tag=NAME: an unknown tag or a malformed selection exits 2 saying which tags exist, nothing written', () => {
    const out = path.join(temp, 'only');
    const unknown = cli('build', FIXTURE, '--out', out, '--only', 'tag=no-such-customer');
    expect(unknown.code).toBe(2);
    // The fixture tags nothing, and says so.
    expect(unknown.err).toMatch(/no characteristic is tagged no-such-customer; no characteristic has tags/);
    expect(unknown.err).not.toMatch(/\bat .*\.ts:\d+/);
    const malformed = cli('build', FIXTURE, '--out', out, '--only', 'customer');
    expect(malformed.code).toBe(2);
    expect(malformed.err).toMatch(/--only customer .*use --only tag=NAME/);
    expect(existsSync(out)).toBe(false);
  });
});
