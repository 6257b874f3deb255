/**
 * The bin runs the bundle in dist/bundle/ when it is fresh, else the
 * compiled JavaScript in dist/ when that is, and the TypeScript sources
 * otherwise; all three must write the same pack.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
// @ts-expect-error: a plain .mjs module without type declarations
import { bundleIsFresh, compiledIsFresh } from '../bin/load-cli.mjs';
import { BIN, ROOT, hashTree } from './helpers/cli.ts';

const tmp = mkdtempSync(path.join(tmpdir(), 'plumbline-compiled-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

function tree(files: Record<string, number>): string {
  const root = mkdtempSync(path.join(tmp, 'root-'));
  for (const [name, seconds] of Object.entries(files)) {
    const p = path.join(root, name);
    mkdirSync(path.dirname(p), { recursive: true });
    writeFileSync(p, '');
    utimesSync(p, seconds, seconds);
  }
  return root;
}

describe('compiledIsFresh', () => {
  it('is false without dist/cli.js', () => {
    expect(compiledIsFresh(tree({ 'src/cli.ts': 1000 }))).toBe(false);
  });
  it('is true when dist/cli.js is as new as every source file', () => {
    expect(compiledIsFresh(tree({ 'src/cli.ts': 1000, 'src/pack/pdf.ts': 2000, 'dist/cli.js': 2000 }))).toBe(true);
  });
  it('is false when any source file, however deep, is newer', () => {
    expect(compiledIsFresh(tree({ 'src/cli.ts': 1000, 'src/render/pool/chart-worker.ts': 2001, 'dist/cli.js': 2000 }))).toBe(false);
  });
  it('holds for the bundle apart: dist/bundle/cli.js against the sources', () => {
    expect(bundleIsFresh(tree({ 'src/cli.ts': 1000, 'dist/cli.js': 2000 }))).toBe(false);
    expect(bundleIsFresh(tree({ 'src/cli.ts': 1000, 'dist/bundle/cli.js': 2000 }))).toBe(true);
    expect(bundleIsFresh(tree({ 'src/cli.ts': 1000, 'src/pack/pdf.ts': 2001, 'dist/bundle/cli.js': 2000 }))).toBe(false);
  });
});

describe('the compiled CLI', () => {
  it('writes the same pack bundled, compiled and from the TypeScript sources, its worker threads included', () => {
    // Compile and bundle if the checkout's dist/ is missing or stale (npm ci does both through `prepare`).
    const fresh = () =>
      spawnSync(process.execPath, ['-e', "import('./bin/load-cli.mjs').then((m) => process.stdout.write(String(m.compiledIsFresh() && m.bundleIsFresh())))"], { cwd: ROOT, encoding: 'utf8' }).stdout;
    if (fresh() !== 'true') {
      const tsc = spawnSync(process.execPath, [path.join(ROOT, 'node_modules/typescript/bin/tsc'), '-p', 'tsconfig.build.json'], { cwd: ROOT, encoding: 'utf8' });
      expect(tsc.status, tsc.stdout).toBe(0);
      const bundle = spawnSync(process.execPath, [path.join(ROOT, 'bin/bundle.mjs')], { cwd: ROOT, encoding: 'utf8' });
      expect(bundle.status, bundle.stderr).toBe(0);
    }
    expect(fresh()).toBe('true');
    // --png with two jobs: PNGs on the chart pool, index.md and index.html on the pages worker.
    const build = (out: string, env: Record<string, string>) =>
      spawnSync(process.execPath, [BIN, 'build', path.join(ROOT, 'data/demo'), '--out', out, '--png', '--jobs', '2', '--no-cache', '-q'], { encoding: 'utf8', env: { ...process.env, ...env } });
    const bundled = build(path.join(tmp, 'bundled'), {});
    const compiled = build(path.join(tmp, 'compiled'), { PLUMBLINE_UNBUNDLED: '1' });
    const source = build(path.join(tmp, 'source'), { PLUMBLINE_FROM_SOURCE: '1' });
    expect(bundled.status, bundled.stderr).toBe(0);
    expect(compiled.status, compiled.stderr).toBe(0);
    expect(source.status, source.stderr).toBe(0);
    const files = hashTree(path.join(tmp, 'bundled'));
    expect(Object.keys(files)).toContain('charts/bottle-weight.png');
    expect(files).toEqual(hashTree(path.join(tmp, 'compiled')));
    expect(files).toEqual(hashTree(path.join(tmp, 'source')));
  }, 120_000);
});
