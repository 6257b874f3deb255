/**
 * The incremental build cache and the worker threads: a rebuild after one
 * data file changed redoes only that characteristic and writes the same
 * pack, byte for byte, as a cold build of the same inputs; a damaged cache
 * entry is redone, never trusted; the number of threads never changes a
 * byte. Expected outputs are the cold builds themselves, made without cache.
 */
import { createHash } from 'node:crypto';
import { cpSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { deserialize } from 'node:v8';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT, cli, hashTree } from './helpers/cli.ts';
import { writePlant } from '../bench/plant.ts';
import { loadFonts } from '../src/render/fonts.ts';

const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-cache-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

const CACHE = '.plumbline-cache';
const packOnly = (dir: string) => Object.fromEntries(Object.entries(hashTree(dir)).filter(([f]) => !f.startsWith(CACHE)));
/** Characteristics' entries (`<key>.v8`, with side files `<key>.svg`, `.png`, `.scene`); the pack's parts (pages, Markdown and HTML) are the `part-` ones. */
const cacheKeys = (dir: string) => readdirSync(path.join(dir, CACHE)).filter((f) => /^[0-9a-f]{64}\.v8$/.test(f)).sort();
const sideFiles = (dir: string) => readdirSync(path.join(dir, CACHE)).filter((f) => /^[0-9a-f]{64}\.(svg|png|scene)$/.test(f)).sort();
const partKeys = (dir: string) => readdirSync(path.join(dir, CACHE)).filter((f) => f.startsWith('part-')).sort();
/** Corrects the last reading of the workspace's fill-volume data by `delta`: a real change to one data file. */
function correctLastReading(ws: string, delta: number): void {
  const file = path.join(ws, 'data/fill-volume.csv');
  const rows = readFileSync(file, 'utf8').trimEnd().split('\n');
  const [date, value] = rows.at(-1)!.split(',');
  rows[rows.length - 1] = `${date},${(Number(value) + delta).toFixed(1)}`;
  writeFileSync(file, `${rows.join('\n')}\n`);
}

/**
 * Damages the cache file `file` of the pack in `out` (built from `ws`), corrects a reading, and
 * rebuilds: the pack must be what a build without the cache writes from a copy of the same pack.
 */
function expectDamagedFileIgnored(ws: string, out: string, file: string): void {
  const cold = `${out}-cold`;
  writeFileSync(file, Buffer.from('not a cache file'));
  correctLastReading(ws, 0.2);
  cpSync(out, cold, { recursive: true });
  expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
  expect(cli('build', ws, '--out', cold, '--no-cache', '-q').code).toBe(0);
  expect(packOnly(out)).toEqual(packOnly(cold));
}

/** A copy of the demo workspace, `<name>-ws`, and the folder its pack goes to, `<name>-out`. */
function demoCopy(name: string): { ws: string; out: string } {
  const ws = path.join(temp, `${name}-ws`);
  cpSync(path.join(ROOT, 'data/demo'), ws, { recursive: true });
  return { ws, out: path.join(temp, `${name}-out`) };
}

const json = (r: { out: string }) => JSON.parse(r.out) as { exitCode: number; cache: { reused: number; redone: number } | null };

describe('the build cache', () => {
  const ws = path.join(temp, 'ws');
  cpSync(path.join(ROOT, 'data/demo'), ws, { recursive: true });
  const out = path.join(temp, 'out');
  const before = path.join(temp, 'before');

  it('redoes only the characteristic whose data changed, and writes what a cold build writes', () => {
    const first = json(cli('build', ws, '--out', out, '--json'));
    expect(first.cache).toEqual({ reused: 0, redone: 19 });
    const keysBefore = cacheKeys(out);
    expect(keysBefore).toHaveLength(19);
    cpSync(out, before, { recursive: true });

    // Unchanged inputs: everything comes from the cache.
    const again = json(cli('build', ws, '--out', out, '--previous', before, '--json'));
    expect(again.cache).toEqual({ reused: 19, redone: 0 });

    // One reading of one characteristic corrected.
    correctLastReading(ws, 0.4);
    const entryFile = (k: string) => path.join(out, CACHE, k);
    const inodes = new Map(keysBefore.map((k) => [k, statSync(entryFile(k)).ino]));
    const sideInodes = new Map(sideFiles(out).map((f) => [f, statSync(entryFile(f)).ino]));
    // pack.pdf's parts: the cover, contents, decisions, overview, a section per characteristic, cautions and method.
    const partsBefore = partKeys(out);
    expect(partsBefore.length).toBeGreaterThanOrEqual(19 + 4);
    // Each part's texts are found in the pack's own index.md and index.html, where the cache's text
    // index says: index.md is the parts' texts joined by blank lines, and index.html has the parts'
    // bodies one after another, a line end between each two.
    const texts = deserialize(readFileSync(path.join(out, CACHE, 'texts.v8'))) as { parts: Map<string, readonly [number, number, number, number]> };
    const indexMd = readFileSync(path.join(out, 'index.md'));
    const indexHtml = readFileSync(path.join(out, 'index.html'));
    expect([...texts.parts.keys()].map((k) => `part-${k}.v8`).sort()).toEqual(partsBefore);
    const at = [...texts.parts.values()];
    expect(Buffer.concat(at.flatMap(([s, e], i) => [...(i ? [Buffer.from('\n\n')] : []), indexMd.subarray(s, e)]))).toEqual(indexMd.subarray(0, -1));
    const bodies = at.filter(([, , s, e]) => e > s);
    for (let i = 1; i < bodies.length; i++) expect(bodies[i]![2]).toBe(bodies[i - 1]![3] + 1);
    expect(indexHtml.subarray(bodies[0]![2], bodies[0]![2] + 3).toString()).toBe('<h1');
    expect(indexHtml.subarray(bodies.at(-1)![3]).toString()).toMatch(/^<\/main>/);
    const partInodes = new Map(partsBefore.map((k) => [k, statSync(entryFile(k)).ino]));
    const chartInodes = new Map(readdirSync(path.join(out, 'charts')).map((f) => [f, statSync(path.join(out, 'charts', f)).ino]));
    const bytesBefore = hashTree(path.join(out, CACHE));
    const warm = json(cli('build', ws, '--out', out, '--previous', before, '--json'));
    expect(warm.cache).toEqual({ reused: 18, redone: 1 });
    const keysAfter = cacheKeys(out);
    expect(keysAfter.filter((k) => !keysBefore.includes(k))).toHaveLength(1);
    expect(keysBefore.filter((k) => !keysAfter.includes(k))).toHaveLength(1);
    // The 18 unchanged entries were linked from the old pack, not written again: same file (inode), same bytes.
    const kept = keysAfter.filter((k) => keysBefore.includes(k));
    expect(kept).toHaveLength(18);
    for (const k of kept) {
      expect(statSync(entryFile(k)).ino).toBe(inodes.get(k));
      expect(statSync(entryFile(k)).nlink).toBe(1);
    }
    // Their side files (chart and scene) too.
    const sidesKept = sideFiles(out).filter((f) => kept.some((k) => f.startsWith(k.slice(0, 64))));
    expect(sidesKept.length).toBe(18 * 2);
    for (const f of sidesKept) expect(statSync(entryFile(f)).ino).toBe(sideInodes.get(f));
    const bytesAfter = hashTree(path.join(out, CACHE));
    for (const k of kept) expect(bytesAfter[k]).toBe(bytesBefore[k]);
    // Only the parts whose content changed were laid out again: the changed characteristic's section,
    // the cover (its input fingerprint), and the decisions and overview tables if its row changed.
    const partsAfter = partKeys(out);
    const laidOut = partsAfter.filter((k) => !partsBefore.includes(k));
    expect(laidOut.length).toBeGreaterThanOrEqual(2);
    expect(laidOut.length).toBeLessThanOrEqual(4);
    expect(partsAfter).toHaveLength(partsBefore.length);
    for (const k of partsAfter.filter((k) => partsBefore.includes(k))) expect(statSync(entryFile(k)).ino).toBe(partInodes.get(k));
    // The pack's 18 unchanged charts were linked from the old pack (which then went: one link each),
    // and only the changed one is a new file.
    const charts = readdirSync(path.join(out, 'charts'));
    expect(charts.filter((f) => statSync(path.join(out, 'charts', f)).ino !== chartInodes.get(f))).toEqual(['fill-volume.svg']);
    for (const f of charts) expect(statSync(path.join(out, 'charts', f)).nlink).toBe(1);

    const cold = path.join(temp, 'cold');
    const c = json(cli('build', ws, '--out', cold, '--previous', before, '--no-cache', '--json'));
    expect(c.cache).toBeNull();
    expect(packOnly(out)).toEqual(packOnly(cold));
    expect(Object.keys(packOnly(out))).toContain('pack.pdf');
    expect(readdirSync(cold)).not.toContain(CACHE);
  }, 180_000);

  it('redoes an entry it cannot read, and verify passes over the cache', () => {
    const keys = cacheKeys(out);
    writeFileSync(path.join(out, CACHE, keys[0]!), 'not a cache entry');
    writeFileSync(path.join(out, CACHE, keys[1]!), new Uint8Array([0xff, 0x0f, 0x01, 0x02]));
    // A damaged laid-out part of pack.pdf is laid out again.
    const part = partKeys(out)[0]!;
    writeFileSync(path.join(out, CACHE, part), 'not a part');
    const expected = packOnly(out);
    // An entry whose side file is gone is redone too.
    const svgSide = sideFiles(out).find((f) => f.endsWith('.svg') && ![keys[0], keys[1]].some((k) => f.startsWith(k!.slice(0, 64))))!;
    rmSync(path.join(out, CACHE, svgSide));
    // A summary.json changed since it was written (same size) is not drawn on: its parts are written afresh.
    const summaryFile = path.join(out, 'summary.json');
    const summary = readFileSync(summaryFile, 'latin1');
    expect(summary.split('"keep"').length).toBeGreaterThan(3);
    writeFileSync(summaryFile, summary.replaceAll('"keep"', '"kept"'), 'latin1');
    // An index.html edited since it was written (same size): no part's texts are copied from it, and
    // every part is written from its nodes again.
    const htmlFile = path.join(out, 'index.html');
    const page = readFileSync(htmlFile, 'latin1');
    expect(page).toContain('<h2');
    writeFileSync(htmlFile, page.replace('<h2', '<H2'), 'latin1');
    // A chart of the pack edited in place (same size) is not linked into the new pack, but copied
    // from the cache again.
    const chart = path.join(out, 'charts', readdirSync(path.join(out, 'charts'))[0]!);
    const drawn = readFileSync(chart, 'latin1');
    writeFileSync(chart, drawn.replace('<svg', '<SVG'), 'latin1');
    expect(readFileSync(chart, 'latin1')).not.toBe(drawn);
    const r = json(cli('build', ws, '--out', out, '--previous', before, '--json'));
    expect(r.cache).toEqual({ reused: 16, redone: 3 });
    expect(packOnly(out)).toEqual(expected);
    expect(sideFiles(out)).toContain(svgSide);
    // The damaged entries were written afresh, not linked: the next build reads them all.
    expect(readFileSync(path.join(out, CACHE, keys[0]!), 'latin1')).not.toBe('not a cache entry');
    expect(readFileSync(path.join(out, CACHE, part), 'latin1')).not.toBe('not a part');
    expect(json(cli('build', ws, '--out', out, '--previous', before, '--json')).cache).toEqual({ reused: 19, redone: 0 });
    expect(cli('verify', out).code).toBe(0);
    // The charts were copied from the cache, not linked to it: changing one changes no cache file.
    for (const f of readdirSync(path.join(out, 'charts'))) expect(statSync(path.join(out, 'charts', f)).nlink).toBe(1);
    // A file put into the pack itself is still caught.
    writeFileSync(path.join(out, 'extra.txt'), 'x');
    expect(cli('verify', out).code).toBe(1);
  }, 180_000);

  it('adds PNGs to cached charts when a build asks for them, and copies them from the cache after', () => {
    const src = path.join(ROOT, 'data/demo');
    const grown = path.join(temp, 'grown');
    const earlier = path.join(temp, 'grown-earlier');
    expect(json(cli('build', src, '--out', grown, '--json')).cache).toEqual({ reused: 0, redone: 19 });
    cpSync(grown, earlier, { recursive: true });
    expect(sideFiles(grown).filter((f) => f.endsWith('.png'))).toEqual([]);
    // The cold build with PNGs is the expected pack (itself checked against one thread in 'threads').
    const cold = path.join(temp, 'grown-cold');
    expect(cli('build', src, '--out', cold, '--previous', earlier, '--png', '--no-cache', '-q').code).toBe(0);
    expect(json(cli('build', src, '--out', grown, '--previous', earlier, '--png', '--json')).cache).toEqual({ reused: 19, redone: 0 });
    expect(packOnly(grown)).toEqual(packOnly(cold));
    expect(sideFiles(grown).filter((f) => f.endsWith('.png'))).toHaveLength(19);
    // Again with PNGs: every chart and PNG now comes from the cache, and the entries are linked as they were.
    const entryInodes = new Map(cacheKeys(grown).map((k) => [k, statSync(path.join(grown, CACHE, k)).ino]));
    expect(json(cli('build', src, '--out', grown, '--previous', earlier, '--png', '--json')).cache).toEqual({ reused: 19, redone: 0 });
    expect(packOnly(grown)).toEqual(packOnly(cold));
    for (const [k, ino] of entryInodes) expect(statSync(path.join(grown, CACHE, k)).ino).toBe(ino);
    // Without PNGs the pack has none, and the cache keeps them for a later build that asks.
    expect(cli('build', src, '--out', grown, '--previous', earlier, '-q').code).toBe(0);
    expect(Object.keys(packOnly(grown)).filter((f) => f.endsWith('.png'))).toEqual([]);
    expect(sideFiles(grown).filter((f) => f.endsWith('.png'))).toHaveLength(19);
  }, 180_000);

  it('writes a pack whose template has a footnote whole, and its rebuild equals a cold build', () => {
    // A footnote spans parts (its list comes at the end of index.html), so such a tree is never written
    // part by part; a rebuild must still give the cold build's bytes.
    const noted = path.join(temp, 'noted');
    cpSync(path.join(ROOT, 'data/demo'), noted, { recursive: true });
    mkdirSync(path.join(noted, 'templates'));
    const method = readFileSync(path.join(ROOT, 'templates/method.md'), 'utf8');
    writeFileSync(path.join(noted, 'templates/method.md'), `${method.trimEnd()}\n\nLimits are recalculated only on a ledger row.[^why]\n\n[^why]: So that every change of limits has a reason on record.\n`);
    const warmOut = path.join(temp, 'noted-out');
    expect(json(cli('build', noted, '--out', warmOut, '--json')).cache).toEqual({ reused: 0, redone: 19 });
    const earlier = path.join(temp, 'noted-earlier');
    cpSync(warmOut, earlier, { recursive: true });
    correctLastReading(noted, -0.3);
    expect(json(cli('build', noted, '--out', warmOut, '--previous', earlier, '--json')).cache).toEqual({ reused: 18, redone: 1 });
    const coldOut = path.join(temp, 'noted-cold');
    expect(cli('build', noted, '--out', coldOut, '--previous', earlier, '--no-cache', '-q').code).toBe(0);
    expect(packOnly(warmOut)).toEqual(packOnly(coldOut));
    // Its parts keep their pages, but the cache knows no part's texts: index.html was made whole.
    expect(partKeys(warmOut).length).toBeGreaterThan(19);
    expect((deserialize(readFileSync(path.join(warmOut, CACHE, 'texts.v8'))) as { parts: Map<string, unknown> }).parts.size).toBe(0);
    // The footnote is there: its reference and its definition in index.md, its list in index.html.
    const md = readFileSync(path.join(warmOut, 'index.md'), 'utf8');
    expect(md).toContain('[^why]: So that every change');
    const html = readFileSync(path.join(warmOut, 'index.html'), 'utf8');
    expect(html).toMatch(/<section[^>]*data-footnotes[^>]*>[\s\S]*So that every change of limits has a reason on record/);
  }, 180_000);
});

describe('threads', () => {
  it('draws the same PNGs and pack with one thread as with three', () => {
    const one = path.join(temp, 'jobs-1');
    const three = path.join(temp, 'jobs-3');
    expect(cli('build', path.join(ROOT, 'data/demo'), '--out', one, '--png', '--jobs', '1', '--no-cache', '-q').code).toBe(0);
    expect(cli('build', path.join(ROOT, 'data/demo'), '--out', three, '--png', '--jobs', '3', '--no-cache', '-q').code).toBe(0);
    const a = hashTree(one);
    expect(Object.keys(a).filter((f) => f.endsWith('.png'))).toHaveLength(19);
    expect(hashTree(three)).toEqual(a);
  }, 180_000);

  it('writes the same SVGs and pack with one thread as with two, where the pages worker draws the SVGs', () => {
    const one = path.join(temp, 'svg-jobs-1');
    const two = path.join(temp, 'svg-jobs-2');
    expect(cli('build', path.join(ROOT, 'data/demo'), '--out', one, '--jobs', '1', '--no-cache', '-q').code).toBe(0);
    expect(cli('build', path.join(ROOT, 'data/demo'), '--out', two, '--jobs', '2', '--no-cache', '-q').code).toBe(0);
    const a = hashTree(one);
    expect(Object.keys(a).filter((f) => f.endsWith('.svg'))).toHaveLength(19);
    expect(hashTree(two)).toEqual(a);
  }, 180_000);

  it('writes the same pack with one thread as with two where the worker draws charts as they are assessed, batch by batch', () => {
    // 120 characteristics: with two threads the charts go to the worker in batches of 50 during the
    // analysis (build.ts DRAW_BATCH) and the last 20 after it; with one, all are drawn here at the end.
    const ws = path.join(temp, 'plant-120');
    writePlant(ws, { characteristics: 120, seed: 7 });
    const one = path.join(temp, 'plant-jobs-1');
    const two = path.join(temp, 'plant-jobs-2');
    expect(cli('build', ws, '--out', one, '--jobs', '1', '--no-cache', '-q').code).toBeLessThanOrEqual(1);
    expect(cli('build', ws, '--out', two, '--jobs', '2', '--no-cache', '-q').code).toBeLessThanOrEqual(1);
    const a = hashTree(one);
    expect(Object.keys(a).filter((f) => f.endsWith('.svg')).length).toBeGreaterThan(100);
    expect(hashTree(two)).toEqual(a);
    // With the cache, the worker writes each chart into the pack and the cache's copy beside its entry
    // itself: the pack is the same, every cached SVG is one of the pack's charts, and verify (which
    // hashes every file against the manifest) passes.
    const cached = path.join(temp, 'plant-jobs-2-cached');
    expect(cli('build', ws, '--out', cached, '--jobs', '2', '-q').code).toBeLessThanOrEqual(1);
    expect(packOnly(cached)).toEqual(a);
    const charts = Object.entries(a).filter(([f]) => f.startsWith('charts/')).map(([, h]) => h).sort();
    const sides = Object.entries(hashTree(cached)).filter(([f]) => f.startsWith(CACHE) && f.endsWith('.svg')).map(([, h]) => h).sort();
    expect(sides).toEqual(charts);
    expect(cli('verify', cached).code).toBe(0);
    // On letter paper every part is laid out again, from the scenes the worker wrote into the cache
    // (read back with v8's deserialiser): the pack must be a cold letter build's.
    // Both compared with the same earlier pack, so that "Since the last review" reads the same.
    const earlier = path.join(temp, 'plant-a4');
    cpSync(cached, earlier, { recursive: true });
    const letterCold = path.join(temp, 'plant-letter-cold');
    expect(cli('build', ws, '--out', letterCold, '--paper', 'letter', '--previous', earlier, '--no-cache', '-q').code).toBeLessThanOrEqual(1);
    expect(json(cli('build', ws, '--out', cached, '--paper', 'letter', '--previous', earlier, '--json')).cache).toEqual({ reused: 120, redone: 0 });
    expect(packOnly(cached)).toEqual(packOnly(letterCold));
  }, 240_000);

  it('fills a rebuild\'s summary.json from the previous one alike on one thread (here) and on two (the pages worker)', () => {
    const cold = path.join(temp, 'fill-cold');
    expect(cli('build', path.join(ROOT, 'data/demo'), '--out', cold, '--jobs', '1', '--no-cache', '-q').code).toBe(0);
    const expected = readFileSync(path.join(cold, 'summary.json'));
    for (const jobs of ['1', '2']) {
      const out = path.join(temp, `fill-${jobs}`);
      expect(cli('build', path.join(ROOT, 'data/demo'), '--out', out, '--jobs', jobs, '-q').code).toBe(0);
      // The second build takes every characteristic's part of summary.json from the first's.
      expect(json(cli('build', path.join(ROOT, 'data/demo'), '--out', out, '--jobs', jobs, '--json')).cache).toEqual({ reused: 19, redone: 0 });
      const made = readFileSync(path.join(out, 'summary.json'));
      expect(made.equals(expected)).toBe(true);
      // The manifest lists the file's size and SHA-256 (hashed here), and verify agrees.
      const manifest = JSON.parse(readFileSync(path.join(out, 'manifest.json'), 'utf8')) as { outputs: { path: string; bytes: number; sha256: string }[] };
      expect(manifest.outputs.find((o) => o.path === 'summary.json')).toEqual({ path: 'summary.json', bytes: made.length, sha256: createHash('sha256').update(made).digest('hex') });
      expect(cli('verify', out).code).toBe(0);
    }
  }, 180_000);

  it('refuses a --jobs that is not a whole number from 1 to 256', () => {
    for (const bad of ['0', '1.5', 'many', '257']) {
      const r = cli('build', path.join(ROOT, 'data/demo'), '--out', path.join(temp, 'never'), '--jobs', bad);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(/--jobs .* is not a number of threads/);
    }
    // A negative number reads as an option; the argument reader says so, as a usage error too.
    expect(cli('build', path.join(ROOT, 'data/demo'), '--out', path.join(temp, 'never'), '--jobs', '-2').code).toBe(2);
  });
});

describe('what the cache keeps', () => {
  it('leaves out characteristics with more points than the limit, and keeps the rest', async () => {
    const { planPack } = await import('../src/build.ts');
    const { loadWorkspace } = await import('../src/workspace/load.ts');
    const loaded = loadWorkspace(path.join(ROOT, 'data/demo'));
    if (!loaded.ok) throw new Error('the demo does not load');
    const ws = loaded.workspace;
    const plan = await planPack(ws, ws.config.period.to, { paper: 'a4', png: false, jobs: 1, cache: () => undefined, maxCachedPoints: 40 });
    const counts = plan.briefs.map((b) => b.points);
    // Counted from each brief (its assessment's points): one entry per characteristic of at most 40 points, with
    // its side files (the pack's parts, `part-` entries, are kept whatever their charts' size).
    const entries = [...plan.cache.keys()].filter((k) => /^[0-9a-f]{64}\.v8$/.test(path.basename(k)));
    const sides = [...plan.cache.keys()].filter((k) => /^[0-9a-f]{64}\.(svg|png|scene)$/.test(path.basename(k)));
    expect(new Set(sides.map((k) => path.basename(k).slice(0, 64)))).toEqual(new Set(entries.map((k) => path.basename(k).slice(0, 64))));
    expect(entries.length).toBe(counts.filter((n) => n <= 40).length);
    expect(entries.length).toBeGreaterThan(0);
    expect(entries.length).toBeLessThan(19);
    expect(plan.cacheUse).toEqual({ reused: 0, redone: 19 });
  }, 120_000);
});

describe('made sections', () => {
  // The expected packs are cold builds of the same inputs, in the same process, without a cache.
  const { ws, out } = demoCopy('made');

  async function plans(options: { readonly templateChange?: string } = {}) {
    const { planPack } = await import('../src/build.ts');
    const { loadWorkspace } = await import('../src/workspace/load.ts');
    const { openCache, openMadeSections, openPartCache, openPartTexts, openSummaryPieces } = await import('../src/pack/build-cache.ts');
    const loaded = loadWorkspace(ws);
    if (!loaded.ok) throw new Error('the workspace does not load');
    const w = loaded.workspace;
    const base = { paper: 'a4', png: false, jobs: 1 } as const;
    const cold = await planPack(w, w.config.period.to, base);
    const cache = openCache(out);
    const read: string[] = [];
    const warm = await planPack(w, w.config.period.to, {
      ...base,
      // Counts the assessments read back from the cache.
      cache: (key) => {
        const hit = cache(key);
        return hit && { ...hit, assessment: () => (read.push(hit.brief.id), hit.assessment()) };
      },
      partCache: openPartCache(out),
      summaryPieces: openSummaryPieces(out),
      madeSections: openMadeSections(out),
      partTexts: openPartTexts(out),
    });
    for (const f of ['index.md', 'index.html', 'pack.pdf', 'summary.json', 'record.json', 'manifest.json']) {
      expect(Buffer.from(warm.files.get(f)!).equals(Buffer.from(cold.files.get(f)!)), f).toBe(true);
    }
    return { warm, read };
  }

  it('a rebuild reads back no unchanged characteristic\'s assessment, and writes what a cold build writes', async () => {
    expect(json(cli('build', ws, '--out', out, '--json')).cache).toEqual({ reused: 0, redone: 19 });
    correctLastReading(ws, 0.4);
    const { warm, read } = await plans();
    expect(warm.cacheUse).toEqual({ reused: 18, redone: 1 });
    expect(read).toEqual([]);
  }, 120_000);

  it('builds a section again where a heading elsewhere now takes its id first', async () => {
    // The cache as the changed data (above) left it.
    expect(json(cli('build', ws, '--out', out, '--json')).cache).toEqual({ reused: 18, redone: 1 });
    // A heading before the characteristics whose id is fill-volume's section's ("c-fill-volume"):
    // that section's heading becomes "c-fill-volume-2", so the section made before no longer fits.
    const pack = readFileSync(path.join(ROOT, 'templates/pack.md'), 'utf8');
    expect(pack).toContain('{{characteristics}}');
    mkdirSync(path.join(ws, 'templates'), { recursive: true });
    writeFileSync(path.join(ws, 'templates/pack.md'), pack.replace('{{characteristics}}', '## C fill volume\n\nA heading of our own.\n\n{{characteristics}}'));
    const { warm, read } = await plans();
    expect(warm.cacheUse).toEqual({ reused: 19, redone: 0 });
    expect(read).toContain('fill-volume');
    expect(new TextDecoder().decode(warm.files.get('index.html'))).toContain('id="c-fill-volume-2"');
    rmSync(path.join(ws, 'templates/pack.md'));
  }, 120_000);

  it('builds the last section again where the pack\'s template now follows the characteristics with more of the same part', async () => {
    expect(json(cli('build', ws, '--out', out, '--json')).cache).toEqual({ reused: 19, redone: 0 });
    const pack = readFileSync(path.join(ROOT, 'templates/pack.md'), 'utf8');
    mkdirSync(path.join(ws, 'templates'), { recursive: true });
    // A paragraph right after the characteristics belongs to the last one's part (no heading between).
    writeFileSync(path.join(ws, 'templates/pack.md'), pack.replace('{{characteristics}}', '{{characteristics}}\n\nA closing paragraph of our own.'));
    const { read } = await plans();
    expect(read).toHaveLength(1);
    rmSync(path.join(ws, 'templates/pack.md'));
  }, 120_000);
});

describe('review.yaml through the cache', () => {
  const { ws, out } = demoCopy('review');
  const memo = path.join(out, CACHE, 'review.v8');

  it('keeps the settings read from review.yaml, and reads the file again once its text changes', () => {
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    const inode = statSync(memo).ino;
    // The same text: the settings kept are used, and the file is linked into the new cache as it was.
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    expect(statSync(memo).ino).toBe(inode);
    // Another title: review.yaml is read again, and the pack has the new title.
    const file = path.join(ws, 'review.yaml');
    const text = readFileSync(file, 'utf8');
    expect(text).toMatch(/^title: .+$/m);
    writeFileSync(file, text.replace(/^title: .+$/m, 'title: A title of our own'));
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    expect(statSync(memo).ino).not.toBe(inode);
    expect(readFileSync(path.join(out, 'index.md'), 'utf8')).toMatch(/^# A title of our own$/m);
    // A review.yaml with an error is reported as without the cache, and nothing is written.
    writeFileSync(file, text.replace(/^title: .+$/m, 'title: [unclosed'));
    const bad = cli('build', ws, '--out', out, '-q');
    expect(bad.code).toBe(2);
    expect(bad.err).toContain('review.yaml');
    expect(readFileSync(path.join(out, 'index.md'), 'utf8')).toMatch(/^# A title of our own$/m);
  }, 120_000);
});

describe('the fonts\' layouts through the cache', () => {
  const { ws, out } = demoCopy('words');
  const file = path.join(out, CACHE, 'words.v8');

  it('keeps each face\'s words and pairs by its font file\'s SHA-256, and a damaged file changes no byte of the pack', () => {
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    // Keyed by the SHA-256 of the font files the pack embeds, computed here with Node's crypto module.
    const fonts = loadFonts();
    const shas = [fonts.regular, fonts.semibold].map((b) => createHash('sha256').update(b).digest('hex')).sort();
    const stored = deserialize(readFileSync(file)) as { faces: Map<string, { words: Map<string, unknown>; pairs: Map<number, unknown>; plain: number[] }> };
    expect([...stored.faces.keys()].sort()).toEqual(shas);
    const regular = stored.faces.get(createHash('sha256').update(fonts.regular).digest('hex'))!;
    // A word of the demo's text, and no figures: those are laid out from the pairs.
    expect(regular.words.has('Decisions')).toBe(true);
    expect([...regular.words.keys()].some((w) => /^[0-9.,\-–]+$/.test(w))).toBe(false);
    expect(regular.pairs.size).toBeGreaterThan(0);

    // Nothing changed: a rebuild lays out only the pages it cannot take whole from the last pack, and
    // a word no build used for four builds is no longer kept. A word the build uses is kept with age 0.
    const ageOf = (word: string) => (deserialize(readFileSync(file)) as typeof stored).faces.get(createHash('sha256').update(fonts.regular).digest('hex'))!.words.get(word) as { age: number } | undefined;
    expect(ageOf('Decisions')?.age).toBe(0);
    const ages: (number | undefined)[] = [];
    for (let i = 0; i < 5; i++) {
      expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
      ages.push(ageOf('Decisions')?.age);
    }
    // "Decisions" heads a page kept whole from the second build on: used by the cold build and the
    // first rebuild (which adds the comparison with the previous pack), then a build older each time.
    expect(ages).toEqual([0, 1, 2, 3, 4]);
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    expect(ageOf('Decisions')).toBeUndefined();
    // Now every word kept is used: built once more, the file is linked into the new cache as it was.
    const inode = statSync(file).ino;
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    expect(statSync(file).ino).toBe(inode);

    // A damaged file is not used, and is written again.
    expectDamagedFileIgnored(ws, out, file);
    expect((deserialize(readFileSync(file)) as typeof stored).faces.size).toBe(2);
  }, 120_000);
});

describe('the templates\' trees through the cache', () => {
  const { ws, out } = demoCopy('trees');
  const file = path.join(out, CACHE, 'templates.v8');

  it('keeps each template\'s tree by its text, linked while the templates are the same, and a damaged file changes no byte of the pack', () => {
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    // The tool's four templates (the demo has none of its own), by their text as in templates/.
    const texts = ['pack', 'characteristic', 'cautions', 'method'].map((n) => readFileSync(path.join(ROOT, 'templates', `${n}.md`), 'utf8')).sort();
    const stored = () => deserialize(readFileSync(file)) as { trees: Map<string, { type: string }> };
    expect([...stored().trees.keys()].sort()).toEqual(texts);
    expect([...stored().trees.values()].every((t) => t.type === 'root')).toBe(true);
    const inode = statSync(file).ino;
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    expect(statSync(file).ino).toBe(inode);

    // A damaged file is not used, and is written again.
    expectDamagedFileIgnored(ws, out, file);
    expect([...stored().trees.keys()].sort()).toEqual(texts);
  }, 120_000);
});

describe('the previous record, as this tool wrote it', () => {
  const { ws, out } = demoCopy('record');
  const earlier = path.join(temp, 'record-earlier');

  it('is taken as written while its stamp is the same, and checked as untrusted input once it changed', () => {
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    cpSync(out, earlier, { recursive: true });
    correctLastReading(ws, 0.4);
    // Without --previous, the build compares with --out's own record.json, which it wrote: the same
    // section as a cold build given a copy of that pack (whose record is read as untrusted input).
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    const cold = path.join(temp, 'record-cold');
    expect(cli('build', ws, '--out', cold, '--previous', earlier, '--no-cache', '-q').code).toBe(0);
    const md = readFileSync(path.join(out, 'index.md'), 'utf8');
    expect(md).toContain('## Since the last review');
    expect(md).toBe(readFileSync(path.join(cold, 'index.md'), 'utf8'));
    // An edited record.json is not taken as written: not a record, it is left out of the comparison.
    writeFileSync(path.join(out, 'record.json'), '{"format": 2}\n');
    const r = cli('build', ws, '--out', out, '-q');
    expect(r.code).toBe(0);
    expect(readFileSync(path.join(out, 'index.md'), 'utf8')).not.toContain('## Since the last review');
  }, 120_000);
});
